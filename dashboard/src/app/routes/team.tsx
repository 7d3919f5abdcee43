import { Navigate } from 'react-router';
import { Loading } from '../../components/states';
import { paths } from '../../config/paths';
import { useMe } from '../../features/auth/api/get-me';
import { useFleet } from '../../features/sites-board/api/get-fleet';
import { TeamPage } from '../../features/team/components/team-page';

/** Admins only (the API enforces it too); others are sent back to their sites. */
export function TeamRoute() {
  const me = useMe();
  const fleet = useFleet();
  if (!me.data) return <Loading />;
  if (me.data.user.role !== 'admin') return <Navigate to={paths.board.href()} replace />;
  return (
    <TeamPage
      myId={me.data.user.id}
      sites={(fleet.data?.sites ?? []).map((s) => ({ id: s.id, name: s.name }))}
    />
  );
}
