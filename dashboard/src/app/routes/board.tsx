import { SitesBoard } from '../../features/sites-board/components/sites-board';

export function BoardRoute() {
  return <SitesBoard />;
}
