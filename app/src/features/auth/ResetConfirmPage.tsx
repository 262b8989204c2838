import { useState } from 'react';
import { Link, useParams } from 'react-router';
import { resetConfirmBodySchema } from '@contracts/api';
import { GateShell } from '../../components/AppShell';
import { FormAlert, SubmitButton, TextField, formValues, useFormErrors } from '../../components/Form';
import { ApiError } from '../../lib/api';
import { FIELDS_SUMMARY, formErrorsFromError, validateWith } from '../../lib/formErrors';
import { useConfirmPasswordReset } from './resetConfirm';

const FIELDS = ['password', 'confirm'] as const;
const LINK_PROBLEM = 'This reset link is incomplete, expired or already used. Request a new one below.';

/** Issues about the token concern the link, not anything the user typed: say so in plain words. */
function aboutToken(issues: readonly { path: readonly PropertyKey[] }[]): boolean {
  return issues.some((i) => i.path[0] === 'token');
}

export function ResetConfirmPage() {
  const { token = '' } = useParams();
  const confirm = useConfirmPasswordReset();
  const [done, setDone] = useState(false);
  const { errors, setErrors, clearErrors, formRef } = useFormErrors();

  function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const values = formValues(e.currentTarget);
    if (values.password !== values.confirm) {
      return setErrors({ fields: { confirm: 'The two passwords differ.' }, form: FIELDS_SUMMARY });
    }
    if (!resetConfirmBodySchema.shape.token.safeParse(token).success) return setErrors({ fields: {}, form: LINK_PROBLEM });
    const checked = validateWith(resetConfirmBodySchema, { token, password: values.password }, FIELDS);
    if (!checked.ok) return setErrors(checked.errors);
    clearErrors();
    confirm.mutate(checked.data, {
      onSuccess: () => setDone(true),
      onError: (err) => setErrors(err instanceof ApiError && aboutToken(err.details) ? { fields: {}, form: LINK_PROBLEM } : formErrorsFromError(err, FIELDS)),
    });
  }

  if (done) {
    return (
      <GateShell title="Password changed">
        <FormAlert tone="success" message="Your new password is set. Sign in with it now." />
        <Link to="/sign-in" className="mt-4 inline-block font-semibold text-phosphor-700 underline-offset-2 hover:underline">
          Go to sign-in
        </Link>
      </GateShell>
    );
  }

  return (
    <GateShell title="Choose a new password">
      <form ref={formRef} noValidate onSubmit={onSubmit} className="space-y-4" aria-label="Choose a new password">
        <FormAlert message={errors.form} />
        <TextField label="New password" name="password" type="password" autoComplete="new-password" required hint="At least 10 characters." error={errors.fields.password} />
        <TextField label="Repeat the new password" name="confirm" type="password" autoComplete="new-password" required error={errors.fields.confirm} />
        <SubmitButton pending={confirm.isPending} pendingLabel="Saving…">
          Set new password
        </SubmitButton>
      </form>
      <p className="mt-6 border-t border-wafer-100 pt-4 text-note text-wafer-600">
        <Link to="/reset" className="font-semibold text-phosphor-700 underline-offset-2 hover:underline">
          Request a new link
        </Link>
      </p>
    </GateShell>
  );
}
