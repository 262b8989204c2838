/**
 * Editing a record guarded by a version number (optimistic concurrency).
 *
 * The form keeps the version it was opened with, and sends that with every save. If the record
 * changed elsewhere in the meantime (another person, tab or device) the server answers 409: the
 * form then says so and offers "Load the latest" instead of letting a second click silently
 * overwrite the other change. The parent starts again from the server's values by remounting
 * the form (a new `key`), which also takes the new version.
 */
import { useState, type FormEvent, type ReactNode } from 'react';
import type { z } from 'zod';
import { ApiError } from '../lib/api';
import { formErrorsFromError, validateWith } from '../lib/formErrors';
import { Button } from './Button';
import { SubmitButton, formValues, useFormErrors } from './Form';

interface VersionedFormOptions<S extends z.ZodType> {
  /** The record's version when the form opened. Later values are ignored until remount. */
  version: number;
  /** The request body's contract; the form's values plus `version` are checked with it. */
  schema: S;
  /** The fields this form shows (issues on other paths become the form-level message). */
  fields: readonly string[];
  /** Shown when the save is answered 409. */
  conflictMessage: string;
  /** Send the checked body; typically a mutation's `mutate`. */
  save: (body: z.output<S>, handlers: { onSuccess: () => void; onError: (err: unknown) => void }) => void;
  onSaved: () => void;
}

export function useVersionedForm<S extends z.ZodType>({ version, schema, fields, conflictMessage, save, onSaved }: VersionedFormOptions<S>) {
  const [baseVersion] = useState(version);
  const [stale, setStale] = useState(false);
  const { errors, setErrors, clearErrors, formRef } = useFormErrors();

  function onSubmit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const checked = validateWith(schema, { ...formValues(e.currentTarget), version: baseVersion }, fields);
    if (!checked.ok) return setErrors(checked.errors);
    clearErrors();
    save(checked.data, {
      onSuccess: onSaved,
      onError: (err) => {
        if (err instanceof ApiError && err.isConflict) {
          setStale(true);
          setErrors({ fields: {}, form: conflictMessage });
        } else setErrors(formErrorsFromError(err, fields));
      },
    });
  }

  return { errors, formRef, stale, onSubmit };
}

/** The save button, and after a 409 the way to start again from the server's latest values. */
export function VersionedFormActions({ pending, stale, onLoadLatest, children }: { pending: boolean; stale: boolean; onLoadLatest: () => void; children: ReactNode }) {
  return (
    <div className="flex flex-wrap gap-2">
      <SubmitButton pending={pending} pendingLabel="Saving…">
        {children}
      </SubmitButton>
      {stale && (
        <Button variant="secondary" onClick={onLoadLatest}>
          Load the latest
        </Button>
      )}
    </div>
  );
}
