import { Link } from 'react-router';
import { Empty } from '../../components/states';
import { paths } from '../../config/paths';

export function NotFoundRoute() {
  return (
    <Empty title="There is nothing at this address">
      <Link className="wk-link" to={paths.board.href()}>
        Back to your sites
      </Link>
    </Empty>
  );
}
