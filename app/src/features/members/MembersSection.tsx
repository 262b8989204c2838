import { useState } from 'react';
import type { Member, Project } from '@contracts/api';
import { type ProjectRole } from '@contracts/roles';
import { Button } from '../../components/Button';
import { FormAlert } from '../../components/Form';
import { Panel } from '../../components/Panel';
import { Loading, QueryError } from '../../components/QueryState';
import { ROLE_LABELS, RoleBadge } from '../../components/RoleBadge';
import { ApiError } from '../../lib/api';
import { useMe } from '../auth/me';
import { useMembers } from './listMembers';
import { useRemoveMember } from './removeMember';
import { useUpdateMemberRole } from './updateMemberRole';

/** Words for a failed team change; a stale version gets its own explanation. */
export function teamChangeMessage(err: unknown): string {
  if (err instanceof ApiError) {
    if (err.code === 'stale_write') return 'Someone else changed this member first. The list now shows the latest state; try again if it is still needed.';
    return err.message;
  }
  return 'The change did not go through. Try again.';
}

function MemberRow({ projectId, member, project, isSelf, onFailure }: { projectId: number; member: Member; project: Project; isSelf: boolean; onFailure: (message: string | null) => void }) {
  const [role, setRole] = useState<ProjectRole>(member.role);
  const [confirming, setConfirming] = useState(false);
  const update = useUpdateMemberRole(projectId);
  const remove = useRemoveMember(projectId);
  const canChange = project.capabilities.includes('members.changeRole');
  const canRemove = project.capabilities.includes('members.remove');
  const selectId = `role-${member.userId}`;

  function applyRole() {
    onFailure(null);
    update.mutate({ userId: member.userId, role, version: member.version }, { onError: (err) => { onFailure(teamChangeMessage(err)); setRole(member.role); } });
  }

  return (
    <li className="py-3">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <div className="min-w-0">
          <p className="wrap-anywhere font-semibold text-wafer-900">
            {member.displayName}
            {isSelf && <span className="ml-1.5 text-fine font-normal text-wafer-500">(you)</span>}
          </p>
          <p className="truncate text-note text-wafer-500">{member.email}</p>
        </div>
        {canChange ? (
          <div className="flex items-center gap-2">
            <label htmlFor={selectId} className="sr-only">
              Role of {member.displayName}
            </label>
            <select
              id={selectId}
              value={role}
              onChange={(e) => setRole(e.target.value as ProjectRole)}
              className="rounded-md border border-wafer-300 bg-white px-2 py-1.5 text-note focus-visible:outline-2 focus-visible:outline-phosphor-500"
            >
              {(Object.keys(ROLE_LABELS) as ProjectRole[]).map((r) => (
                <option key={r} value={r}>
                  {ROLE_LABELS[r].label}
                </option>
              ))}
            </select>
            {role !== member.role && (
              <Button variant="primary" disabled={update.isPending} onClick={applyRole}>
                {update.isPending ? 'Saving…' : 'Apply'}
              </Button>
            )}
          </div>
        ) : (
          <RoleBadge role={member.role} />
        )}
      </div>
      {canRemove && (
        <div className="mt-2 flex flex-wrap items-center gap-2">
          {!confirming ? (
            <Button variant="quiet" className="text-garnet-700 hover:bg-garnet-50 hover:text-garnet-700" onClick={() => setConfirming(true)}>
              Remove from project…
            </Button>
          ) : (
            <>
              <span className="wrap-anywhere text-note text-wafer-700">Remove {member.displayName} from this project?</span>
              <Button
                variant="danger"
                disabled={remove.isPending}
                onClick={() => {
                  onFailure(null);
                  remove.mutate(member.userId, { onError: (err) => { onFailure(teamChangeMessage(err)); setConfirming(false); } });
                }}
              >
                {remove.isPending ? 'Removing…' : 'Remove'}
              </Button>
              <Button variant="secondary" onClick={() => setConfirming(false)}>
                Keep
              </Button>
            </>
          )}
        </div>
      )}
    </li>
  );
}

export function MembersSection({ project }: { project: Project }) {
  const members = useMembers(project.id, project.capabilities.includes('members.read'));
  const me = useMe();
  // Kept here, not in the row: a failed change refetches the list and remounts the row.
  const [failure, setFailure] = useState<string | null>(null);
  return (
    <Panel title="Team" description="Everyone with access to this project and what they may do.">
      <FormAlert message={failure} />
      {members.isPending && <Loading label="Loading the team…" />}
      {members.isError && <QueryError error={members.error} what="the team" onRetry={() => void members.refetch()} />}
      {members.data && (
        <ul className="divide-y divide-wafer-100" aria-label="Team members">
          {members.data.map((m) => (
            // The key includes the version so a row resets its local choice when the server's copy changes.
            <MemberRow key={`${m.userId}-${m.version}`} projectId={project.id} member={m} project={project} isSelf={me.data?.id === m.userId} onFailure={setFailure} />
          ))}
        </ul>
      )}
      <p className="mt-3 text-fine text-wafer-500">
        {(Object.keys(ROLE_LABELS) as ProjectRole[]).map((r) => `${ROLE_LABELS[r].label}: ${ROLE_LABELS[r].summary}`).join('. ')}. A project always keeps at least one owner.
      </p>
    </Panel>
  );
}
