/**
 * Map field issues (from the server's `details` or from a local zod check) onto form fields.
 *
 * Both sources use the same shape, `{ path, message }`, with the path into the request body.
 * A form names the fields it shows; an issue whose path starts with one of them lands beside
 * that field. Anything else (an empty path, or a field this form does not show) is kept as a
 * form-level message so nothing the server said is ever silently dropped.
 */
import type { z } from 'zod';
import { ApiError } from './api';

export type FieldErrors = Record<string, string>;

export interface FormErrors {
  fields: FieldErrors;
  /** Shown in the form's aria-live region. */
  form: string | null;
}

export const noErrors: FormErrors = { fields: {}, form: null };

interface IssueLike {
  path: readonly PropertyKey[];
  message: string;
}

export const FIELDS_SUMMARY = 'Some fields need attention; see the notes beside them.';

export function issuesToFormErrors(
  issues: readonly IssueLike[],
  knownFields: readonly string[],
  summary: string = FIELDS_SUMMARY,
): FormErrors {
  const fields: FieldErrors = {};
  const leftover: string[] = [];
  for (const issue of issues) {
    const head = issue.path.length > 0 ? String(issue.path[0]) : '';
    // Nested paths (e.g. ['design', 'sites', 3, 'position']) belong to their top-level field.
    const key = knownFields.includes(head) ? head : null;
    if (key !== null) {
      // The first message per field is the most basic one (zod reports in schema order).
      if (!(key in fields)) fields[key] = issue.message;
    } else {
      const where = issue.path.length > 0 ? `${issue.path.map(String).join('.')}: ` : '';
      leftover.push(`${where}${issue.message}`);
    }
  }
  let form: string | null = null;
  if (leftover.length > 0) form = leftover.join(' ');
  else if (Object.keys(fields).length > 0) form = summary;
  return { fields, form };
}

/** Errors to show after a failed request: field details where the server gave them, else its message. */
export function formErrorsFromError(err: unknown, knownFields: readonly string[]): FormErrors {
  if (err instanceof ApiError) {
    if (err.details.length > 0) return issuesToFormErrors(err.details, knownFields, err.message || FIELDS_SUMMARY);
    return { fields: {}, form: err.message };
  }
  return { fields: {}, form: 'Something went wrong. Try again.' };
}

/**
 * Plain-language messages for the generic checks. Messages written into a contract (e.g. the
 * password rule) take precedence over this per-parse map, so those reach the user unchanged.
 */
export function plainMessage(issue: z.core.$ZodRawIssue): string | undefined {
  switch (issue.code) {
    case 'too_small':
      if (issue.origin === 'string') return Number(issue.minimum) <= 1 ? 'Required.' : `Use at least ${issue.minimum} characters.`;
      return undefined;
    case 'too_big':
      if (issue.origin === 'string') return `Use at most ${issue.maximum} characters.`;
      return undefined;
    case 'invalid_format':
      if (issue.format === 'email') return 'Enter an e-mail address, e.g. name@lab.example.';
      return undefined;
    case 'invalid_type':
      if (issue.input === undefined) return 'Required.';
      return undefined;
    default:
      return undefined;
  }
}

/** Check values with the same zod contract the server uses, before sending them. */
export function validateWith<S extends z.ZodType>(
  schema: S,
  values: unknown,
  knownFields: readonly string[],
): { ok: true; data: z.output<S> } | { ok: false; errors: FormErrors } {
  const result = schema.safeParse(values, { error: plainMessage });
  if (result.success) return { ok: true, data: result.data };
  return { ok: false, errors: issuesToFormErrors(result.error.issues, knownFields) };
}
