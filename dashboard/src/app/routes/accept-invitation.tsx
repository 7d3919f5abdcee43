import { useNavigate, useSearchParams } from 'react-router';
import { paths } from '../../config/paths';
import { AcceptInvitationForm } from '../../features/auth/components/accept-invitation-form';
import { AuthFrame } from '../../features/auth/components/auth-frame';

export function AcceptInvitationRoute() {
  const navigate = useNavigate();
  const [params] = useSearchParams();
  return (
    <AuthFrame title="Join Wellkept">
      <AcceptInvitationForm
        token={params.get('token') ?? ''}
        onAccepted={() => void navigate(paths.board.href(), { replace: true })}
      />
    </AuthFrame>
  );
}
