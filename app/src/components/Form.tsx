/**
 * Accessible form pieces: every control has a label, hints and errors are tied to it with
 * aria-describedby, invalid controls say so with aria-invalid, and form-level messages land in
 * an aria-live region that exists before the message does (so screen readers announce it).
 */
import { useEffect, useId, useRef, useState, type ChangeEvent, type InputHTMLAttributes, type ReactNode, type SelectHTMLAttributes, type TextareaHTMLAttributes } from 'react';
import { noErrors, type FormErrors } from '../lib/formErrors';

const controlBase =
  'block w-full rounded-md border bg-white px-3 py-2 text-body text-wafer-900 placeholder:text-wafer-400 ' +
  'focus-visible:outline-2 focus-visible:outline-offset-1 focus-visible:outline-phosphor-500';

function controlClass(invalid: boolean): string {
  return `${controlBase} ${invalid ? 'border-garnet-600' : 'border-wafer-300'}`;
}

interface FieldFrameProps {
  id: string;
  label: string;
  hint?: ReactNode;
  error?: string;
  children: (describedBy: string | undefined) => ReactNode;
}

function FieldFrame({ id, label, hint, error, children }: FieldFrameProps) {
  const hintId = hint ? `${id}-hint` : undefined;
  const errorId = error ? `${id}-error` : undefined;
  const describedBy = [hintId, errorId].filter(Boolean).join(' ') || undefined;
  return (
    <div className="space-y-1.5">
      <label htmlFor={id} className="block text-note font-semibold text-wafer-800">
        {label}
      </label>
      {children(describedBy)}
      {hint && (
        <p id={hintId} className="text-fine text-wafer-500">
          {hint}
        </p>
      )}
      {error && (
        <p id={errorId} className="text-note font-medium text-garnet-700">
          {error}
        </p>
      )}
    </div>
  );
}

/**
 * A length limit that says so instead of cutting: `maxLength` would drop the end of a pasted
 * name without a word. The counter counts what will be saved (the contracts trim, then count
 * UTF-16 units like zod's `max`), and past the limit the field is marked invalid with the figure.
 */
function useLimit(limit: number | undefined, initial: unknown, onChange?: (e: ChangeEvent<HTMLInputElement & HTMLTextAreaElement>) => void) {
  const [length, setLength] = useState(() => String(initial ?? '').trim().length);
  const over = limit !== undefined && length > limit;
  return {
    over,
    counter: limit === undefined ? null : (
      <span className={`num ${over ? 'font-semibold text-garnet-700' : ''}`}>
        {length} of {limit} characters
      </span>
    ),
    overMessage: over ? `Too long: ${length} characters, at most ${limit} fit. Shorten it before saving.` : undefined,
    onChange: (e: ChangeEvent<HTMLInputElement & HTMLTextAreaElement>) => {
      setLength(e.currentTarget.value.trim().length);
      onChange?.(e);
    },
  };
}

function hintWith(hint: ReactNode, counter: ReactNode): ReactNode {
  if (!counter) return hint;
  return (
    <span className="flex flex-wrap justify-between gap-x-3">
      <span>{hint}</span>
      {counter}
    </span>
  );
}

type TextFieldProps = Omit<InputHTMLAttributes<HTMLInputElement>, 'name' | 'maxLength'> & { label: string; name: string; hint?: ReactNode; error?: string; limit?: number };

export function TextField({ label, name, hint, error, id, className = '', limit, onChange, ...input }: TextFieldProps) {
  const auto = useId();
  const fieldId = id ?? `${auto}-${name}`;
  const lim = useLimit(limit, input.value ?? input.defaultValue, onChange);
  const shownError = error ?? lim.overMessage;
  return (
    <FieldFrame id={fieldId} label={label} hint={hintWith(hint, lim.counter)} error={shownError}>
      {(describedBy) => (
        <input
          id={fieldId}
          name={name}
          aria-invalid={shownError ? true : undefined}
          aria-describedby={describedBy}
          className={`${controlClass(!!shownError)} ${className}`}
          onChange={lim.onChange}
          {...input}
        />
      )}
    </FieldFrame>
  );
}

type TextAreaFieldProps = Omit<TextareaHTMLAttributes<HTMLTextAreaElement>, 'name' | 'maxLength'> & { label: string; name: string; hint?: ReactNode; error?: string; limit?: number };

export function TextAreaField({ label, name, hint, error, id, rows = 3, limit, onChange, ...area }: TextAreaFieldProps) {
  const auto = useId();
  const fieldId = id ?? `${auto}-${name}`;
  const lim = useLimit(limit, area.value ?? area.defaultValue, onChange);
  const shownError = error ?? lim.overMessage;
  return (
    <FieldFrame id={fieldId} label={label} hint={hintWith(hint, lim.counter)} error={shownError}>
      {(describedBy) => (
        <textarea
          id={fieldId}
          name={name}
          rows={rows}
          aria-invalid={shownError ? true : undefined}
          aria-describedby={describedBy}
          className={controlClass(!!shownError)}
          onChange={lim.onChange}
          {...area}
        />
      )}
    </FieldFrame>
  );
}

type SelectFieldProps = Omit<SelectHTMLAttributes<HTMLSelectElement>, 'name'> & {
  label: string;
  name: string;
  hint?: ReactNode;
  error?: string;
  options: readonly { value: string; label: string }[];
};

export function SelectField({ label, name, hint, error, id, options, ...select }: SelectFieldProps) {
  const auto = useId();
  const fieldId = id ?? `${auto}-${name}`;
  return (
    <FieldFrame id={fieldId} label={label} hint={hint} error={error}>
      {(describedBy) => (
        <select id={fieldId} name={name} aria-invalid={error ? true : undefined} aria-describedby={describedBy} className={controlClass(!!error)} {...select}>
          {options.map((o) => (
            <option key={o.value} value={o.value}>
              {o.label}
            </option>
          ))}
        </select>
      )}
    </FieldFrame>
  );
}

/** Form-level message. Rendered always (empty when quiet) so the live region is registered early. */
export function FormAlert({ message, tone = 'error' }: { message: string | null | undefined; tone?: 'error' | 'success' | 'info' }) {
  const tones = {
    error: 'border-garnet-300 bg-garnet-50 text-garnet-700',
    success: 'border-phosphor-300 bg-phosphor-50 text-phosphor-800',
    info: 'border-wafer-200 bg-wafer-50 text-wafer-700',
  } as const;
  return (
    <div aria-live={tone === 'error' ? 'assertive' : 'polite'} aria-atomic="true">
      {message ? (
        <p role={tone === 'error' ? 'alert' : 'status'} className={`rounded-md border px-3 py-2 text-note ${tones[tone]}`}>
          {message}
        </p>
      ) : null}
    </div>
  );
}

export function SubmitButton({ pending, children, pendingLabel = 'Working…', variant = 'primary' }: { pending: boolean; children: ReactNode; pendingLabel?: string; variant?: 'primary' | 'danger' }) {
  const look =
    variant === 'primary'
      ? 'bg-phosphor-700 text-white hover:bg-phosphor-800'
      : 'border border-garnet-300 bg-white text-garnet-700 hover:bg-garnet-50';
  return (
    <button
      type="submit"
      disabled={pending}
      aria-busy={pending || undefined}
      className={`inline-flex items-center justify-center rounded-md px-4 py-2 text-note font-semibold transition-colors disabled:cursor-not-allowed disabled:opacity-60 focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-phosphor-500 ${look}`}
    >
      {pending ? pendingLabel : children}
    </button>
  );
}

/**
 * Error state for one form. After a failed submit the first field with an error takes focus,
 * so keyboard and screen-reader users land where the fix is needed.
 */
export function useFormErrors() {
  const [errors, setErrors] = useState<FormErrors>(noErrors);
  const formRef = useRef<HTMLFormElement>(null);
  useEffect(() => {
    const first = Object.keys(errors.fields)[0];
    if (!first || !formRef.current) return;
    const el = formRef.current.elements.namedItem(first);
    if (el instanceof HTMLElement) el.focus();
  }, [errors]);
  return { errors, setErrors, clearErrors: () => setErrors(noErrors), formRef };
}

/** Read a form's text controls as a plain object of strings. */
export function formValues(form: HTMLFormElement): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [k, v] of new FormData(form)) if (typeof v === 'string') out[k] = v;
  return out;
}
