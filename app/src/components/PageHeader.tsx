import type { ReactNode } from 'react';

export function PageHeader({ eyebrow, title, lead, children }: { eyebrow?: ReactNode; title: string; lead?: ReactNode; children?: ReactNode }) {
  return (
    <div className="mb-8 flex flex-wrap items-end justify-between gap-4">
      <div className="min-w-0">
        {eyebrow && <div className="mb-1 text-fine font-semibold uppercase tracking-wider text-phosphor-700">{eyebrow}</div>}
        <h1 className="text-display font-extrabold tracking-tight text-wafer-900">{title}</h1>
        {lead && <p className="mt-1 max-w-3xl text-body text-wafer-600">{lead}</p>}
      </div>
      {children}
    </div>
  );
}
