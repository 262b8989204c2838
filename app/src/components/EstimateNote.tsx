/**
 * The standing caveat for every number Tetrawell shows. Later screens that print energies,
 * distances or error bars reuse this component next to them; the footer carries it always.
 */
export function EstimateNote({ variant = 'inline', assumptions }: { variant?: 'inline' | 'footer'; assumptions?: string }) {
  const text =
    'Numbers here are model estimates: a continuum dielectric host, effective-mass envelopes and a finite-element solution. ' +
    "Confirm them with your group's own validated methods before they guide a fabrication or design decision.";
  if (variant === 'footer') {
    return (
      <p className="max-w-4xl text-fine text-wafer-600">
        <span className="font-semibold text-ember-800">Model estimates. </span>
        {text}
      </p>
    );
  }
  return (
    <aside aria-label="About these numbers" className="rounded-md border border-ember-300 bg-ember-50 px-3 py-2 text-note text-ember-800">
      <p>
        <span className="font-semibold">Model estimates. </span>
        {assumptions ? `${assumptions} ` : ''}
        {text}
      </p>
    </aside>
  );
}
