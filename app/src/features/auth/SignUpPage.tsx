import { Link, Navigate, useNavigate, useSearchParams } from 'react-router';
import { signUpBodySchema } from '@contracts/api';
import { GateShell } from '../../components/AppShell';
import { FormAlert, SubmitButton, TextField, formValues, useFormErrors } from '../../components/Form';
import { formErrorsFromError, validateWith } from '../../lib/formErrors';
import { safeNextPath, withNext } from '../../lib/nextPath';
import { useMe } from './me';
import { useSignUp } from './signUp';

const FIELDS = ['displayName', 'email', 'password'] as const;

export function SignUpPage() {
  const [params] = useSearchParams();
  const next = safeNextPath(params.get('next'));
  const navigate = useNavigate();
  const me = useMe();
  const signUp = useSignUp();
  const { errors, setErrors, clearErrors, formRef } = useFormErrors();

  if (me.data) return <Navigate to={next} replace />;

  function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const checked = validateWith(signUpBodySchema, formValues(e.currentTarget), FIELDS);
    if (!checked.ok) return setErrors(checked.errors);
    clearErrors();
    signUp.mutate(checked.data, {
      onSuccess: () => navigate(next, { replace: true }),
      onError: (err) => setErrors(formErrorsFromError(err, FIELDS)),
    });
  }

  return (
    <GateShell title="Create your account" lead="One account for every project your group shares with you.">
      <form ref={formRef} noValidate onSubmit={onSubmit} className="space-y-4" aria-label="Create account">
        <FormAlert message={errors.form} />
        <TextField label="Display name" name="displayName" autoComplete="name" required hint="Shown to your teammates." error={errors.fields.displayName} />
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
        <Link to={withNext('/sign-in', params.get('next'))} className="font-semibold text-phosphor-700 underline-offset-2 hover:underline">
          Sign in
        </Link>
      </p>
    </GateShell>
  );
}
