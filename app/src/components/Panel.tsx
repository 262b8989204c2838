import { useId, type ReactNode } from 'react';

/** A titled section of a page; the heading names the region for assistive technology. */
export function Panel({ title, description, actions, children }: { title: string; description?: ReactNode; actions?: ReactNode; children: ReactNode }) {
  const id = useId();
  return (
    <section aria-labelledby={id} className="rounded-lg border border-wafer-200 bg-white shadow-[0_1px_2px_rgb(17_28_38/0.05)]">
      <header className="flex flex-wrap items-start justify-between gap-3 border-b border-wafer-100 px-5 py-4">
        <div>
          <h2 id={id} className="text-lead font-bold text-wafer-900">
            {title}
          </h2>
          {description && <p className="mt-0.5 text-note text-wafer-500">{description}</p>}
        </div>
        {actions}
      </header>
      <div className="px-5 py-4">{children}</div>
    </section>
  );
}
