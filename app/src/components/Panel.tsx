import { useId, type ReactNode } from 'react';

/**
 * A titled section of a page, set on the paper ground like a section of a lab report: a short
 * dark rule over the heading, a hairline under it, the content below. The heading names the
 * region for assistive technology.
 */
export function Panel({ title, description, actions, children }: { title: string; description?: ReactNode; actions?: ReactNode; children: ReactNode }) {
  const id = useId();
  return (
    <section aria-labelledby={id} className="min-w-0">
      <header className="relative flex flex-wrap items-end justify-between gap-x-4 gap-y-2 border-b border-wafer-200 pb-2 pt-3 before:absolute before:left-0 before:top-0 before:h-0.5 before:w-8 before:bg-phosphor-700">
        <div className="min-w-0">
          <h2 id={id} className="text-lead font-bold text-wafer-900">
            {title}
          </h2>
          {description && <p className="text-note text-wafer-600">{description}</p>}
        </div>
        {actions}
      </header>
      <div className="pt-4">{children}</div>
    </section>
  );
}
