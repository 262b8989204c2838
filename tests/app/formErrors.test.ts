/**
 * Server field details and local zod issues land beside the right form fields. The issue shape
 * `{ path, message }` is the contract's fieldIssueSchema (server/contracts/api.ts); expected
 * messages are read from the contract schemas themselves, not copied here.
 */
import { describe, expect, it } from 'vitest';
import { passwordSchema, signUpBodySchema, invitationCreateBodySchema } from '@contracts/api';
import { ApiError } from '../../app/src/lib/api';
import { formErrorsFromError, issuesToFormErrors, validateWith } from '../../app/src/lib/formErrors';

const FIELDS = ['email', 'password', 'displayName'] as const;

describe('issuesToFormErrors', () => {
  it('puts each issue beside its field and keeps the first message per field', () => {
    const out = issuesToFormErrors(
      [
        { path: ['email'], message: 'first' },
        { path: ['email'], message: 'second' },
        { path: ['password'], message: 'too short' },
      ],
      FIELDS,
    );
    expect(out.fields).toEqual({ email: 'first', password: 'too short' });
    expect(out.form).not.toBeNull(); // a summary for the live region
  });

  it('maps nested paths to their top-level field', () => {
    const out = issuesToFormErrors([{ path: ['design', 'sites', 3, 'position'], message: 'not finite' }], ['design']);
    expect(out.fields).toEqual({ design: 'not finite' });
  });

  it('never drops an issue for a field the form does not show: it becomes form-level text', () => {
    const out = issuesToFormErrors([{ path: ['version'], message: 'Expected a number' }, { path: [], message: 'Body must be an object' }], FIELDS);
    expect(out.fields).toEqual({});
    expect(out.form).toContain('version: Expected a number');
    expect(out.form).toContain('Body must be an object');
  });

  it('gives no errors for no issues', () => {
    expect(issuesToFormErrors([], FIELDS)).toEqual({ fields: {}, form: null });
  });
});

describe('formErrorsFromError', () => {
  it('uses the server details for fields and its message as the summary', () => {
    const err = new ApiError(422, 'validation_failed', 'Check the fields.', [{ path: ['email'], message: 'Invalid email address' }]);
    expect(formErrorsFromError(err, FIELDS)).toEqual({ fields: { email: 'Invalid email address' }, form: 'Check the fields.' });
  });

  it('shows the server message alone when there are no details (e.g. 401, 409, 429)', () => {
    const err = new ApiError(401, 'unauthenticated', 'E-mail or password is not right.');
    expect(formErrorsFromError(err, FIELDS)).toEqual({ fields: {}, form: err.message });
  });

  it('has a generic message for non-API failures', () => {
    expect(formErrorsFromError(new Error('boom'), FIELDS).form).toBeTruthy();
  });
});

describe('validateWith (the same contracts the server parses with)', () => {
  it('passes valid input through the contract, including its transforms', () => {
    const r = validateWith(signUpBodySchema, { email: '  Ada@Lab.Example ', password: 'long-enough-pass', displayName: ' Ada ' }, FIELDS);
    expect(r.ok).toBe(true);
    // emailSchema trims and lower-cases; displayNameSchema trims.
    if (r.ok) expect(r.data).toEqual(signUpBodySchema.parse({ email: '  Ada@Lab.Example ', password: 'long-enough-pass', displayName: ' Ada ' }));
  });

  it('keeps a message written into the contract (the password rule) over the plain-language map', () => {
    const contractMessage = passwordSchema.safeParse('short').error!.issues[0].message;
    const r = validateWith(signUpBodySchema, { email: 'a@b.example', password: 'short', displayName: 'A' }, FIELDS);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors.fields.password).toBe(contractMessage);
  });

  it('words generic failures plainly: empty required text, malformed e-mail', () => {
    const r = validateWith(signUpBodySchema, { email: 'not-an-address', password: 'long-enough-pass', displayName: '   ' }, FIELDS);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.errors.fields.displayName).toBe('Required.');
      expect(r.errors.fields.email).toMatch(/e-mail address/);
    }
  });

  it('flags a role outside the role table', () => {
    const r = validateWith(invitationCreateBodySchema, { email: 'x@y.example', role: 'superuser' }, ['email', 'role']);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(Object.keys(r.errors.fields)).toEqual(['role']);
  });
});
