import { Link, useParams } from 'react-router';
import { PageHeader } from '../../components/PageHeader';
import { usePageTitle } from '../../components/pageTitle';
import { Loading, QueryError } from '../../components/QueryState';
import { ROLE_LABELS } from '../../components/RoleBadge';
import { ApiError } from '../../lib/api';
import { formatDateTime } from '../../lib/format';
import { DesignsTable } from '../designs/DesignsTable';
import { InvitationsSection } from '../invitations/InvitationsSection';
import { MembersSection } from '../members/MembersSection';
import { AuditSection } from './AuditSection';
import { ProjectSettings } from './ProjectSettings';
import { useProject } from './getProject';

export function ProjectPage() {
  const { projectId: raw } = useParams();
  const projectId = Number(raw);
  const valid = Number.isInteger(projectId) && projectId > 0;
  const project = useProject(valid ? projectId : 0, valid);
  const missing = !valid || (project.error instanceof ApiError && (project.error.status === 404 || project.error.status === 403));
  const name = project.data?.name;
  usePageTitle(missing ? 'Project not found' : (name ?? 'Project'), [{ label: 'Projects', to: '/projects' }, { label: missing ? 'Not found' : (name ?? '…') }]);

  if (missing) {
    return (
      <div className="max-w-xl">
        <PageHeader title="Project not found" lead="It does not exist, was deleted, or you are not a member of it. Ask one of its owners for an invitation." />
        <Link to="/projects" className="font-semibold text-phosphor-700 underline-offset-2 hover:underline">
          Back to your projects
        </Link>
      </div>
    );
  }
  if (project.isPending) return <Loading label="Loading the project…" />;
  if (project.isError) return <QueryError error={project.error} what="the project" onRetry={() => void project.refetch()} />;

  const p = project.data;
  return (
    <>
      <PageHeader title={p.name} lead={p.description || undefined}>
        <div className="shrink-0 text-note text-wafer-600 md:text-right">
          <p>
            Your role: <span className="font-semibold text-wafer-900">{ROLE_LABELS[p.role].label}</span> ({ROLE_LABELS[p.role].summary})
          </p>
          <p className="text-fine text-wafer-500">
            Created <time dateTime={p.createdAt}>{formatDateTime(p.createdAt)}</time> · updated <time dateTime={p.updatedAt}>{formatDateTime(p.updatedAt)}</time>
          </p>
        </div>
      </PageHeader>
      {/* The designs get the full width; team and history sit side by side below them. */}
      <div className="space-y-10">
        <DesignsTable project={p} />
        <div className="grid items-start gap-x-10 gap-y-10 lg:grid-cols-2">
          <div className="min-w-0 space-y-10">
            <MembersSection project={p} />
            <InvitationsSection project={p} />
          </div>
          <div className="min-w-0 space-y-10">
            <AuditSection project={p} />
            <ProjectSettings project={p} />
          </div>
        </div>
      </div>
    </>
  );
}
