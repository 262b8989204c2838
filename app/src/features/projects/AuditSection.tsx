import type { Project } from '@contracts/api';
import { Panel } from '../../components/Panel';
import { Loading, QueryError } from '../../components/QueryState';
import { formatDateTime } from '../../lib/format';
import { describeAction, describeDetail } from './describeAudit';
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
        <ol className="space-y-2.5" aria-label="Recent activity">
          {audit.data.slice(0, SHOWN).map((e) => (
            <li key={e.id} className="grid grid-cols-[9.5rem_1fr] gap-3 text-note">
              <time dateTime={e.at} className="num text-wafer-500">
                {formatDateTime(e.at)}
              </time>
              <div className="min-w-0">
                <span className="font-semibold text-wafer-900">{e.actor ?? 'System'}</span> <span className="text-wafer-700">{describeAction(e.action).toLowerCase()}</span>
                {Object.keys(e.detail).length > 0 && <p className="truncate text-fine text-wafer-500">{describeDetail(e.detail)}</p>}
              </div>
            </li>
          ))}
        </ol>
      )}
    </Panel>
  );
}
