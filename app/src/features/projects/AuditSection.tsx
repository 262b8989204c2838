import type { Project } from '@contracts/api';
import { Panel } from '../../components/Panel';
import { Loading, QueryError } from '../../components/QueryState';
import { formatDateTime } from '../../lib/format';
import { describeAuditEntry } from './describeAudit';
import { useAudit } from './listAudit';

const SHOWN = 25;

export function AuditSection({ project }: { project: Project }) {
  const canRead = project.capabilities.includes('audit.read');
  const audit = useAudit(project.id, canRead);
  if (!canRead) return null;
  return (
    <Panel title="Activity" description="Who did what in this project, newest first.">
      {audit.isPending && <Loading label="Loading activity…" />}
      {audit.isError && <QueryError error={audit.error} what="the activity log" onRetry={() => void audit.refetch()} />}
      {audit.data && audit.data.length === 0 && <p className="text-note text-wafer-500">Nothing recorded yet.</p>}
      {audit.data && audit.data.length > 0 && (
        <ol className="divide-y divide-wafer-100" aria-label="Recent activity">
          {audit.data.slice(0, SHOWN).map((e) => {
            const { summary, more } = describeAuditEntry(e);
            return (
              <li key={e.id} className="py-2 text-note first:pt-0 last:pb-0">
                <time dateTime={e.at} className="num block text-fine text-wafer-500">
                  {formatDateTime(e.at)}
                </time>
                <p className="wrap-anywhere text-wafer-800">{summary}</p>
                {more.length > 0 && (
                  <details className="group mt-1">
                    <summary className="w-fit cursor-pointer rounded text-fine font-semibold text-phosphor-700 hover:text-phosphor-800">
                      <span className="group-open:hidden">Show in full</span>
                      <span className="hidden group-open:inline">Hide</span>
                    </summary>
                    <dl className="mt-1.5 space-y-1.5 border-l-2 border-wafer-200 pl-3 text-fine">
                      {more.map((m, i) => (
                        <div key={i}>
                          <dt className="font-semibold text-wafer-600">{m.label}</dt>
                          <dd className="whitespace-pre-wrap wrap-anywhere text-wafer-800">{m.value}</dd>
                        </div>
                      ))}
                    </dl>
                  </details>
                )}
              </li>
            );
          })}
        </ol>
      )}
    </Panel>
  );
}
