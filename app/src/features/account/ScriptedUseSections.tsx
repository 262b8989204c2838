import { useState } from 'react';
import { apiTokenCreateBodySchema, type ApiTokenCreated } from '@contracts/api';
import { Button } from '../../components/Button';
import { FormAlert, SubmitButton, TextField, formValues, useFormErrors } from '../../components/Form';
import { Loading, QueryError } from '../../components/QueryState';
import { formErrorsFromError, validateWith } from '../../lib/formErrors';
import { useApiTokens } from './listApiTokens';
import { useCreateApiToken } from './createApiToken';
import { useRevokeApiToken } from './revokeApiToken';
import { useNotifications, useSetNotifications } from './notifications';

const TOKEN_FIELDS = ['name'] as const;

const when = (iso: string | null) => (iso ? new Date(iso).toLocaleString() : 'never');

/** The secret of a token just made: shown once, with a copy button. */
function NewSecret({ created, onDone }: { created: ApiTokenCreated; onDone: () => void }) {
  const [copied, setCopied] = useState<'yes' | 'failed' | null>(null);
  return (
    <div className="space-y-2 border border-amber-300 bg-amber-50 p-3" role="status">
      <p className="text-sm">
        Token “<span className="wrap-anywhere">{created.token.name}</span>” made. Copy it now: it is shown only this once and cannot be read again.
      </p>
      <code className="block bg-white p-2 text-xs wrap-anywhere" data-testid="new-token-secret">
        {created.secret}
      </code>
      <div className="flex flex-wrap gap-2">
        <Button
          variant="secondary"
          onClick={() => {
            navigator.clipboard.writeText(created.secret).then(
              () => setCopied('yes'),
              () => setCopied('failed'),
            );
          }}
        >
          Copy token
        </Button>
        <Button variant="secondary" onClick={onDone}>
          I have stored it
        </Button>
      </div>
      <FormAlert tone="success" message={copied === 'yes' ? 'Copied to the clipboard.' : null} />
      <FormAlert message={copied === 'failed' ? 'The browser refused the clipboard: select the token and copy it by hand.' : null} />
    </div>
  );
}

/** Personal API tokens for scripts and the command line's remote mode (`npm run cli -- submit`). */
export function ApiTokensSection() {
  const tokens = useApiTokens();
  const create = useCreateApiToken();
  const revoke = useRevokeApiToken();
  const [created, setCreated] = useState<ApiTokenCreated | null>(null);
  const [revokeError, setRevokeError] = useState<string | null>(null);
  const { errors, setErrors, clearErrors, formRef } = useFormErrors();

  function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const checked = validateWith(apiTokenCreateBodySchema, formValues(form), TOKEN_FIELDS);
    if (!checked.ok) return setErrors(checked.errors);
    clearErrors();
    create.mutate(checked.data.name, {
      onSuccess: (r) => {
        setCreated(r);
        form.reset();
      },
      onError: (err) => setErrors(formErrorsFromError(err, TOKEN_FIELDS)),
    });
  }

  return (
    <div className="space-y-4">
      <p className="text-sm text-slate-600">
        A token lets a script act as you (your projects, your roles) by sending <code>Authorization: Bearer …</code>. Tetrawell keeps only a hash of it.
      </p>
      {created && <NewSecret created={created} onDone={() => setCreated(null)} />}
      <form ref={formRef} noValidate onSubmit={onSubmit} className="space-y-3" aria-label="Create API token">
        <FormAlert message={errors.form} />
        <TextField label="Token name" name="name" required limit={80} hint="What uses it, e.g. “cluster batch script”." error={errors.fields.name} />
        <SubmitButton pending={create.isPending} pendingLabel="Creating…">
          Create token
        </SubmitButton>
      </form>
      <FormAlert message={revokeError} />
      {tokens.isPending ? (
        <Loading />
      ) : tokens.isError ? (
        <QueryError error={tokens.error} />
      ) : tokens.data.length === 0 ? (
        <p className="text-sm text-slate-600">No tokens yet.</p>
      ) : (
        <ul className="divide-y divide-slate-200" aria-label="API tokens">
          {tokens.data.map((t) => (
            <li key={t.id} className="flex flex-wrap items-center justify-between gap-3 py-2">
              <div className="min-w-0 text-sm">
                <div className="font-medium wrap-anywhere">{t.name}</div>
                <div className="text-slate-600">
                  <code>{t.prefix}…</code> · made {when(t.createdAt)} · last used {when(t.lastUsedAt)}
                </div>
              </div>
              <Button
                variant="danger"
                disabled={revoke.isPending}
                onClick={() => {
                  setRevokeError(null);
                  revoke.mutate(t.id, { onError: (err) => setRevokeError(err instanceof Error ? err.message : 'The token was not revoked. Try again.') });
                }}
              >
                Revoke <span className="sr-only">{t.name}</span>
              </Button>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}

/** The job e-mail switch. */
export function NotificationsSection() {
  const settings = useNotifications();
  const set = useSetNotifications();
  if (settings.isPending) return <Loading />;
  if (settings.isError) return <QueryError error={settings.error} />;
  return (
    <div className="space-y-2">
      <label className="flex items-start gap-2 text-sm">
        <input type="checkbox" className="mt-1" checked={set.isPending ? (set.variables ?? settings.data.jobMail) : settings.data.jobMail} disabled={set.isPending} onChange={(e) => set.mutate(e.target.checked)} />
        <span>E-mail me when a job I started ran longer than a minute and then finished or failed.</span>
      </label>
      <FormAlert message={set.isError ? (set.error instanceof Error ? set.error.message : 'The setting was not saved.') : null} />
    </div>
  );
}
