import { invitationCreateBodySchema, type Project } from '@contracts/api';
import { Button } from '../../components/Button';
import { FormAlert, SelectField, SubmitButton, TextField, formValues, useFormErrors } from '../../components/Form';
import { Panel } from '../../components/Panel';
import { Loading, QueryError } from '../../components/QueryState';
import { ROLE_OPTIONS, RoleBadge } from '../../components/RoleBadge';
import { formatDateTime } from '../../lib/format';
import { formErrorsFromError, validateWith } from '../../lib/formErrors';
import { useState } from 'react';
import { useCreateInvitation } from './createInvitation';
import { useInvitations } from './listInvitations';
import { useRevokeInvitation } from './revokeInvitation';

const FIELDS = ['email', 'role'] as const;

function InviteForm({ projectId }: { projectId: number }) {
  const create = useCreateInvitation(projectId);
  const [sent, setSent] = useState<string | null>(null);
  const { errors, setErrors, clearErrors, formRef } = useFormErrors();

  function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    setSent(null);
    const checked = validateWith(invitationCreateBodySchema, formValues(form), FIELDS);
    if (!checked.ok) return setErrors(checked.errors);
    clearErrors();
    create.mutate(checked.data, {
      onSuccess: () => {
        setSent(`Invitation e-mailed to ${checked.data.email}.`);
        form.reset();
      },
      onError: (err) => setErrors(formErrorsFromError(err, FIELDS)),
    });
  }

  return (
    <form ref={formRef} noValidate onSubmit={onSubmit} className="space-y-3" aria-label="Invite a teammate">
      <FormAlert message={errors.form} />
      <FormAlert tone="success" message={sent} />
      <TextField label="Teammate’s e-mail address" name="email" type="email" autoComplete="off" required error={errors.fields.email} />
      <SelectField label="Role in this project" name="role" defaultValue="viewer" options={ROLE_OPTIONS} error={errors.fields.role} />
      <SubmitButton pending={create.isPending} pendingLabel="Sending…">
        Send invitation
      </SubmitButton>
    </form>
  );
}

export function InvitationsSection({ project }: { project: Project }) {
  const canInvite = project.capabilities.includes('members.invite');
  const invitations = useInvitations(project.id, canInvite);
  const revoke = useRevokeInvitation(project.id);
  const [revokeError, setRevokeError] = useState<string | null>(null);
  if (!canInvite) return null;

  return (
    <Panel title="Invitations" description="Invite by e-mail; the link in the message lets them join with the role you pick.">
      <InviteForm projectId={project.id} />
      <h3 className="mt-6 text-note font-bold text-wafer-700">Waiting for an answer</h3>
      <FormAlert message={revokeError} />
      {invitations.isPending && <Loading label="Loading invitations…" />}
      {invitations.isError && <QueryError error={invitations.error} what="invitations" onRetry={() => void invitations.refetch()} />}
      {invitations.data && invitations.data.length === 0 && <p className="mt-2 text-note text-wafer-500">No open invitations.</p>}
      {invitations.data && invitations.data.length > 0 && (
        <ul className="mt-2 divide-y divide-wafer-100" aria-label="Open invitations">
          {invitations.data.map((inv) => (
            <li key={inv.id} className="flex flex-wrap items-center justify-between gap-2 py-2.5">
              <div className="min-w-0">
                <p className="truncate font-semibold text-wafer-900">{inv.email}</p>
                <p className="text-fine text-wafer-500">
                  by <span className="wrap-anywhere">{inv.invitedBy}</span> · expires <time dateTime={inv.expiresAt}>{formatDateTime(inv.expiresAt)}</time>
                </p>
              </div>
              <div className="flex items-center gap-2">
                <RoleBadge role={inv.role} />
                <Button
                  variant="quiet"
                  aria-label={`Revoke the invitation to ${inv.email}`}
                  disabled={revoke.isPending && revoke.variables === inv.id}
                  onClick={() => {
                    setRevokeError(null);
                    revoke.mutate(inv.id, { onError: (err) => setRevokeError(formErrorsFromError(err, []).form) });
                  }}
                >
                  Revoke
                </Button>
              </div>
            </li>
          ))}
        </ul>
      )}
    </Panel>
  );
}
