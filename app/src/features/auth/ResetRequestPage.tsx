import { useState } from 'react';
import { Link } from 'react-router';
import { resetRequestBodySchema } from '@contracts/api';
import { GateShell } from '../../components/AppShell';
import { FormAlert, SubmitButton, TextField, formValues, useFormErrors } from '../../components/Form';
import { formErrorsFromError, validateWith } from '../../lib/formErrors';
import { useRequestPasswordReset } from './resetRequest';

const FIELDS = ['email'] as const;

export function ResetRequestPage() {
  const request = useRequestPasswordReset();
  const [sentTo, setSentTo] = useState<string | null>(null);
  const { errors, setErrors, clearErrors, formRef } = useFormErrors();

  function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const checked = validateWith(resetRequestBodySchema, formValues(e.currentTarget), FIELDS);
    if (!checked.ok) return setErrors(checked.errors);
    clearErrors();
    request.mutate(checked.data, {
      onSuccess: () => setSentTo(checked.data.email),
      onError: (err) => setErrors(formErrorsFromError(err, FIELDS)),
    });
  }

  return (
    <GateShell title="Reset your password" lead="We e-mail a link that lets you choose a new password.">
      <form ref={formRef} noValidate onSubmit={onSubmit} className="space-y-4" aria-label="Request a password reset">
        <FormAlert message={errors.form} />
        <FormAlert tone="success" message={sentTo ? `If an account uses ${sentTo}, a reset link is on its way. The link expires after a while; request a new one if it does.` : null} />
        <TextField label="E-mail address" name="email" type="email" autoComplete="email" required error={errors.fields.email} />
        <SubmitButton pending={request.isPending} pendingLabel="Sending…">
          Send reset link
        </SubmitButton>
      </form>
      <p className="mt-6 border-t border-wafer-100 pt-4 text-note text-wafer-600">
        <Link to="/sign-in" className="font-semibold text-phosphor-700 underline-offset-2 hover:underline">
          Back to sign-in
        </Link>
      </p>
    </GateShell>
  );
}
