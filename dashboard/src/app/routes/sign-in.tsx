import { useNavigate, useSearchParams } from 'react-router';
import { paths } from '../../config/paths';
import { AuthFrame } from '../../features/auth/components/auth-frame';
import { SignInForm } from '../../features/auth/components/sign-in-form';

/** Only same-site paths are followed after sign-in. */
function safeNext(next: string | null): string {
  return next && next.startsWith('/') && !next.startsWith('//') ? next : paths.board.href();
}

export function SignInRoute() {
  const navigate = useNavigate();
  const [params] = useSearchParams();
  return (
    <AuthFrame title="Sign in" lead="Your water systems, watched from afar.">
      <SignInForm
        resetHref={paths.resetPassword.href()}
        onSignedIn={() => void navigate(safeNext(params.get('next')), { replace: true })}
      />
    </AuthFrame>
  );
}
