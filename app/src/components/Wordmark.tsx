/** The Tetrawell mark: a tetrahedron seen from above with one dopant site at its centre. */
export function Wordmark({ tone = 'dark' }: { tone?: 'dark' | 'light' }) {
  return (
    <span className="inline-flex items-center gap-2">
      <svg aria-hidden="true" viewBox="0 0 32 32" className="h-7 w-7">
        <path d="M16 4 L28 25 L4 25 Z M16 4 L16 18 M4 25 L16 18 L28 25" fill="none" stroke="currentColor" strokeWidth="2" strokeLinejoin="round" className="text-phosphor-400" />
        <circle cx="16" cy="18" r="2.8" className="fill-ember-400" />
      </svg>
      <span className={`text-lead font-extrabold tracking-tight ${tone === 'dark' ? 'text-white' : 'text-wafer-900'}`}>Tetrawell</span>
    </span>
  );
}
