/** The Tetrawell mark: a tetrahedron seen from above with one dopant site at its centre, and the name. */
export function Wordmark({ size = 'large' }: { size?: 'small' | 'large' }) {
  const small = size === 'small';
  return (
    <span className="inline-flex items-center gap-1.5">
      <svg aria-hidden="true" viewBox="0 0 32 32" className={small ? 'h-6 w-6' : 'h-8 w-8'}>
        <path d="M16 4 L28 25 L4 25 Z M16 4 L16 18 M4 25 L16 18 L28 25" fill="none" stroke="currentColor" strokeWidth="2.2" strokeLinejoin="round" className="text-phosphor-700" />
        <circle cx="16" cy="18" r="3" className="fill-ember-600" />
      </svg>
      <span className={`${small ? 'text-body' : 'text-lead'} font-extrabold tracking-tight text-wafer-900`}>Tetrawell</span>
    </span>
  );
}
