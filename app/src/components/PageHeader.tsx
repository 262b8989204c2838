import type { ReactNode } from 'react';

/**
 * The page's own heading: the title (long names wrap anywhere rather than run off the page),
 * an optional lead, and actions or facts on the right. Where the page sits is said by the
 * trail in the frame's header, so there is no label above the title.
 */
export function PageHeader({ title, lead, children }: { title: string; lead?: ReactNode; children?: ReactNode }) {
  return (
    <div className="mb-7 flex flex-wrap items-end justify-between gap-x-8 gap-y-3">
      <div className="min-w-0 max-w-3xl flex-[1_1_24rem]">
        <h1 className="wrap-anywhere text-title font-bold tracking-tight text-wafer-900">{title}</h1>
        {lead && <p className="mt-1 wrap-anywhere text-body text-wafer-600">{lead}</p>}
      </div>
      {children}
    </div>
  );
}
