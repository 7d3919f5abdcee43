import { useSearchParams } from 'react-router';
import { paths } from '../../config/paths';
import { AuthFrame } from '../../features/auth/components/auth-frame';
import {
  ConfirmResetForm,
  RequestResetForm,
} from '../../features/auth/components/reset-password-form';

export function ResetPasswordRoute() {
  const [params] = useSearchParams();
  const token = params.get('token');
  return token ? (
    <AuthFrame title="Set a new password">
      <ConfirmResetForm token={token} signInHref={paths.signIn.href()} />
    </AuthFrame>
  ) : (
    <AuthFrame
      title="Reset your password"
      lead={
        <>
          We will e-mail you a link.{' '}
          <a className="wk-link" href={paths.signIn.href()}>
            Back to sign-in
          </a>
        </>
      }
    >
      <RequestResetForm />
    </AuthFrame>
  );
}
