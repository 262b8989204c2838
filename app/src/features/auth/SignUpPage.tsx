import { useEffect, useRef, useState } from 'react';
import { Link, Navigate, useSearchParams } from 'react-router';
import { signUpBodySchema } from '@contracts/api';
import { GateShell } from '../../components/AppShell';
import { FormAlert, SubmitButton, TextField, formValues, useFormErrors } from '../../components/Form';
import { formErrorsFromError, validateWith } from '../../lib/formErrors';
import { rememberNextAfterConfirm, safeNextPath, withNext } from '../../lib/nextPath';
import { useMe } from './me';
import { useSignUp } from './signUp';

const FIELDS = ['displayName', 'email', 'password'] as const;
const linkClass = 'font-semibold text-phosphor-700 underline-offset-2 hover:underline';

export function SignUpPage() {
  const [params] = useSearchParams();
  const next = safeNextPath(params.get('next'));
  const me = useMe();
  const signUp = useSignUp();
  const [sentTo, setSentTo] = useState<string | null>(null);
  const { errors, setErrors, clearErrors, formRef } = useFormErrors();

  if (me.data) return <Navigate to={next} replace />;

  function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const checked = validateWith(signUpBodySchema, formValues(e.currentTarget), FIELDS);
    if (!checked.ok) return setErrors(checked.errors);
    clearErrors();
    signUp.mutate(checked.data, {
      onSuccess: () => {
        // the confirmation link comes back here-less: remember where to go after it (same browser)
        rememberNextAfterConfirm(params.get('next'));
        setSentTo(checked.data.email);
      },
      onError: (err) => setErrors(formErrorsFromError(err, FIELDS)),
    });
  }

  if (sentTo) return <CheckYourEmail email={sentTo} onRestart={() => setSentTo(null)} />;

  return (
    <GateShell title="Create your account" lead="One account for every project your group shares with you.">
      <form ref={formRef} noValidate onSubmit={onSubmit} className="space-y-4" aria-label="Create account">
        <FormAlert message={errors.form} />
        <TextField label="Display name" name="displayName" autoComplete="name" required limit={80} hint="Shown to your teammates." error={errors.fields.displayName} />
        <TextField label="E-mail address" name="email" type="email" autoComplete="email" required error={errors.fields.email} defaultValue={params.get('email') ?? ''} />
        <TextField label="Password" name="password" type="password" autoComplete="new-password" required hint="At least 10 characters." error={errors.fields.password} />
        <div className="pt-1">
          <SubmitButton pending={signUp.isPending} pendingLabel="Creating account…">
            Create account
          </SubmitButton>
        </div>
      </form>
      <p className="mt-6 border-t border-wafer-100 pt-4 text-note text-wafer-600">
        Already have an account?{' '}
        <Link to={withNext('/sign-in', params.get('next'))} className={linkClass}>
          Sign in
        </Link>
      </p>
    </GateShell>
  );
}

/**
 * Shown after every accepted sign-up, whether the address was new or already had an account:
 * the page must not tell which (the e-mail does, to the owner of the address only).
 */
function CheckYourEmail({ email, onRestart }: { email: string; onRestart: () => void }) {
  const note = useRef<HTMLDivElement>(null);
  // the form is gone: move focus to the message so keyboard and screen-reader users are not lost
  useEffect(() => note.current?.focus(), []);
  return (
    <GateShell title="Check your e-mail">
      <div ref={note} tabIndex={-1} className="space-y-4 text-body text-wafer-700 outline-none">
        <FormAlert tone="success" message={`We sent a message to ${email}. Open the link in it to confirm the address and finish signing up.`} />
        <p className="text-note text-wafer-600">
          If this address already has a Tetrawell account, the message says so and shows how to sign in or reset the password. Nothing arrived after a few
          minutes? Look in the spam folder, or sign up again to get a new link.
        </p>
      </div>
      <p className="mt-6 flex flex-wrap gap-4 border-t border-wafer-100 pt-4 text-note text-wafer-600">
        <button type="button" onClick={onRestart} className={linkClass}>
          Use another address
        </button>
        <Link to="/sign-in" className={linkClass}>
          Go to sign-in
        </Link>
      </p>
    </GateShell>
  );
}
