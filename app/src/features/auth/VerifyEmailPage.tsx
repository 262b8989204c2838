import { useEffect, useRef, useState } from 'react';
import { Link, useNavigate, useParams } from 'react-router';
import { verifyEmailBodySchema } from '@contracts/api';
import { GateShell } from '../../components/AppShell';
import { FormAlert } from '../../components/Form';
import { Loading } from '../../components/QueryState';
import { ApiError } from '../../lib/api';
import { forgetNextAfterConfirm, nextAfterConfirm } from '../../lib/nextPath';
import { useVerifyEmail } from './verifyEmail';

const linkClass = 'font-semibold text-phosphor-700 underline-offset-2 hover:underline';
const LINK_PROBLEM = 'This confirmation link is incomplete, expired or already used.';

/**
 * The page behind the e-mailed `/verify/<token>` link: posts the token once, and on success
 * (now signed in) goes where the sign-up started from, e.g. an invitation page.
 */
export function VerifyEmailPage() {
  const { token = '' } = useParams();
  const verify = useVerifyEmail();
  const navigate = useNavigate();
  // read, not taken: StrictMode may run this twice; forgotten once the link has worked
  const [next] = useState(() => nextAfterConfirm());
  const wellFormed = verifyEmailBodySchema.safeParse({ token }).success;
  const posted = useRef(false);

  useEffect(() => {
    // once per page: a link works only once, a second post would report it as used
    if (posted.current || !wellFormed) return;
    posted.current = true;
    verify.mutate(
      { token },
      {
        onSuccess: () => {
          forgetNextAfterConfirm();
          navigate(next, { replace: true });
        },
      },
    );
  }, [token, wellFormed, verify, navigate, next]);

  if (!wellFormed || verify.isError) {
    const aboutLink = !wellFormed || (verify.error instanceof ApiError && verify.error.status === 422);
    return (
      <GateShell title="This link does not work">
        <FormAlert message={aboutLink ? LINK_PROBLEM : verify.error instanceof ApiError ? verify.error.message : 'Could not confirm the address. Try the link again.'} />
        <p className="mt-4 text-note text-wafer-600">
          Already confirmed? Sign in. Otherwise sign up again with the same address to get a new link; if the address already has an account, the e-mail
          tells you how to sign in.
        </p>
        <p className="mt-6 flex flex-wrap gap-4 border-t border-wafer-100 pt-4 text-note">
          <Link to="/sign-in" className={linkClass}>
            Sign in
          </Link>
          <Link to="/sign-up" className={linkClass}>
            Sign up again
          </Link>
        </p>
      </GateShell>
    );
  }

  return (
    <GateShell title="Confirming your e-mail address">
      <Loading label="Confirming the address and signing you in…" />
    </GateShell>
  );
}
