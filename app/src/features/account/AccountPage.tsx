import { useState } from 'react';
import { accountUpdateBodySchema, passwordChangeBodySchema, type User } from '@contracts/api';
import { FormAlert, SubmitButton, TextField, formValues, useFormErrors } from '../../components/Form';
import { PageHeader } from '../../components/PageHeader';
import { usePageTitle } from '../../components/pageTitle';
import { Panel } from '../../components/Panel';
import { Loading } from '../../components/QueryState';
import { VersionedFormActions, useVersionedForm } from '../../components/VersionedForm';
import { FIELDS_SUMMARY, formErrorsFromError, validateWith } from '../../lib/formErrors';
import { useMe } from '../auth/me';
import { useChangePassword } from './changePassword';
import { useUpdateAccount } from './updateAccount';
import { ApiTokensSection, NotificationsSection } from './ScriptedUseSections';

const NAME_FIELDS = ['displayName'] as const;
const PASSWORD_FIELDS = ['currentPassword', 'newPassword', 'repeatPassword'] as const;

/**
 * Display name, guarded by the account's version. The form keeps the version it opened with,
 * so if the name changed elsewhere (another tab or device) the save is answered 409 and the
 * user decides, instead of one write silently replacing the other.
 */
function DisplayNameForm({ user, onSaved, onLoadLatest }: { user: User; onSaved: () => void; onLoadLatest: () => void }) {
  const update = useUpdateAccount();
  const { errors, formRef, stale, onSubmit } = useVersionedForm({
    version: user.version,
    schema: accountUpdateBodySchema,
    fields: NAME_FIELDS,
    conflictMessage: 'Someone else changed your account details since you opened this page (perhaps you, in another tab). Nothing was saved. Load the latest, then make your change again.',
    save: update.mutate,
    onSaved,
  });

  return (
    <form ref={formRef} noValidate onSubmit={onSubmit} className="space-y-3" aria-label="Change display name">
      <FormAlert message={errors.form} />
      <TextField label="Display name" name="displayName" required limit={80} defaultValue={user.displayName} autoComplete="name" hint="Shown to your teammates in every project." error={errors.fields.displayName} />
      <VersionedFormActions pending={update.isPending} stale={stale} onLoadLatest={onLoadLatest}>
        Save name
      </VersionedFormActions>
    </form>
  );
}

function PasswordForm() {
  const change = useChangePassword();
  const [done, setDone] = useState(false);
  const { errors, setErrors, clearErrors, formRef } = useFormErrors();

  function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    setDone(false);
    const values = formValues(form);
    if (values.newPassword !== values.repeatPassword) {
      return setErrors({ fields: { repeatPassword: 'The two new passwords differ.' }, form: FIELDS_SUMMARY });
    }
    const checked = validateWith(passwordChangeBodySchema, values, PASSWORD_FIELDS);
    if (!checked.ok) return setErrors(checked.errors);
    clearErrors();
    change.mutate(checked.data, {
      onSuccess: () => {
        setDone(true);
        form.reset();
      },
      onError: (err) => setErrors(formErrorsFromError(err, PASSWORD_FIELDS)),
    });
  }

  return (
    <form ref={formRef} noValidate onSubmit={onSubmit} className="space-y-3" aria-label="Change password">
      <FormAlert message={errors.form} />
      <FormAlert tone="success" message={done ? 'Password changed.' : null} />
      <TextField label="Current password" name="currentPassword" type="password" autoComplete="current-password" required error={errors.fields.currentPassword} />
      <TextField label="New password" name="newPassword" type="password" autoComplete="new-password" required hint="At least 10 characters." error={errors.fields.newPassword} />
      <TextField label="Repeat the new password" name="repeatPassword" type="password" autoComplete="new-password" required error={errors.fields.repeatPassword} />
      <SubmitButton pending={change.isPending} pendingLabel="Changing…">
        Change password
      </SubmitButton>
    </form>
  );
}

export function AccountPage() {
  const me = useMe();
  const [nameKey, setNameKey] = useState(0);
  const [nameSaved, setNameSaved] = useState(false);
  usePageTitle('Your account');
  if (!me.data) return <Loading />;
  const user = me.data;
  return (
    <>
      <PageHeader title="Your account" lead={`Signed in as ${user.email}${user.siteRole === 'admin' ? ' · site administrator' : ''}.`} />
      <div className="grid max-w-4xl items-start gap-6 md:grid-cols-2">
        <Panel title="Profile">
          <div className="space-y-3">
            <FormAlert tone="success" message={nameSaved ? 'Name saved.' : null} />
            <DisplayNameForm
              key={nameKey}
              user={user}
              onSaved={() => {
                setNameSaved(true);
                setNameKey((k) => k + 1);
              }}
              onLoadLatest={() => {
                setNameSaved(false);
                // The 409 handler's refetch may still be running: wait for it, then remount.
                void me.refetch().then(() => setNameKey((k) => k + 1));
              }}
            />
          </div>
        </Panel>
        <Panel title="Password">
          <PasswordForm />
        </Panel>
        <Panel title="Job e-mails">
          <NotificationsSection />
        </Panel>
        <Panel title="API tokens">
          <ApiTokensSection />
        </Panel>
      </div>
    </>
  );
}
