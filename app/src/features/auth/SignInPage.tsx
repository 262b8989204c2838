import { Link, Navigate, useNavigate, useSearchParams } from 'react-router';
import { signInBodySchema } from '@contracts/api';
import { GateShell } from '../../components/AppShell';
import { FormAlert, SubmitButton, TextField, formValues, useFormErrors } from '../../components/Form';
import { formErrorsFromError, validateWith } from '../../lib/formErrors';
import { safeNextPath, withNext } from '../../lib/nextPath';
import { useMe } from './me';
import { useSignIn } from './signIn';

const FIELDS = ['email', 'password'] as const;

export function SignInPage() {
  const [params] = useSearchParams();
  const next = safeNextPath(params.get('next'));
  const navigate = useNavigate();
  const me = useMe();
  const signIn = useSignIn();
  const { errors, setErrors, clearErrors, formRef } = useFormErrors();

  if (me.data) return <Navigate to={next} replace />;

  function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const checked = validateWith(signInBodySchema, formValues(e.currentTarget), FIELDS);
    if (!checked.ok) return setErrors(checked.errors);
    clearErrors();
    signIn.mutate(checked.data, {
      onSuccess: () => navigate(next, { replace: true }),
      onError: (err) => setErrors(formErrorsFromError(err, FIELDS)),
    });
  }

  return (
    <GateShell title="Sign in" lead="Welcome back to your dopant-array studies.">
      <form ref={formRef} noValidate onSubmit={onSubmit} className="space-y-4" aria-label="Sign in">
        <FormAlert message={errors.form} />
        <TextField label="E-mail address" name="email" type="email" autoComplete="email" required error={errors.fields.email} defaultValue={params.get('email') ?? ''} />
        <TextField label="Password" name="password" type="password" autoComplete="current-password" required error={errors.fields.password} />
        <div className="flex items-center justify-between gap-3 pt-1">
          <SubmitButton pending={signIn.isPending} pendingLabel="Signing in…">
            Sign in
          </SubmitButton>
          <Link to="/reset" className="text-note font-semibold text-phosphor-700 underline-offset-2 hover:underline">
            Forgot your password?
          </Link>
        </div>
      </form>
      <p className="mt-6 border-t border-wafer-100 pt-4 text-note text-wafer-600">
        New to Tetrawell?{' '}
        <Link to={withNext('/sign-up', params.get('next'))} className="font-semibold text-phosphor-700 underline-offset-2 hover:underline">
          Create an account
        </Link>
      </p>
    </GateShell>
  );
}
