import type { EditIssues } from './deviceEdit';

/**
 * One labelled input of the device forms: label with its unit, the value as typed, and the
 * contract's message under it (linked with aria-describedby, the field marked invalid).
 */
export function NumField({ id, label, unit, value, error, onChange, placeholder, text }: { id: string; label: string; unit?: string; value: string; error?: string; onChange: (v: string) => void; placeholder?: string; text?: boolean }) {
  return (
    <div className="min-w-0">
      <label htmlFor={id} className="block text-fine font-semibold text-wafer-700">
        {label} {unit && <span className="font-normal text-wafer-500">({unit})</span>}
      </label>
      <input
        id={id}
        inputMode={text ? 'text' : 'decimal'}
        value={value}
        placeholder={placeholder}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : undefined}
        onChange={(e) => onChange(e.target.value)}
        className={`${text ? '' : 'num '}w-full rounded border bg-white px-1.5 py-1 text-note ${error ? 'border-garnet-600' : 'border-wafer-300'}`}
      />
      {error && (
        <p id={`${id}-error`} className="text-fine text-garnet-700">
          {error}
        </p>
      )}
    </div>
  );
}

/**
 * What an edit of the device forms was refused for: problems elsewhere in the design (a site now on an
 * interface or in metal), at most four listed, or `refused` (which part was not applied) with a pointer
 * to the marked fields.
 */
export function EditIssueList({ issues, refused }: { issues: EditIssues | null; refused: string }) {
  if (!issues) return null;
  if (issues.other.length > 0)
    return (
      <ul role="alert" className="list-disc pl-4 text-fine text-garnet-700">
        {issues.other.slice(0, 4).map((m) => (
          <li key={m}>{m}</li>
        ))}
        {issues.other.length > 4 && <li>… and {issues.other.length - 4} more.</li>}
      </ul>
    );
  if (Object.keys(issues.fields).length === 0) return null;
  return (
    <p role="alert" className="text-fine text-garnet-700">
      {refused}: see the marked fields.
    </p>
  );
}

