import type { ProjectRole } from '@contracts/roles';

/** What each project role means, in the words the team screens use. */
export const ROLE_LABELS: Record<ProjectRole, { label: string; summary: string }> = {
  owner: { label: 'Owner', summary: 'manages the team, the project and its designs' },
  editor: { label: 'Editor', summary: 'changes designs and the project details' },
  viewer: { label: 'Viewer', summary: 'reads and exports' },
};

export const ROLE_OPTIONS = (Object.keys(ROLE_LABELS) as ProjectRole[]).map((r) => ({ value: r, label: `${ROLE_LABELS[r].label}: ${ROLE_LABELS[r].summary}` }));

const tones: Record<ProjectRole, string> = {
  owner: 'bg-phosphor-100 text-phosphor-800',
  editor: 'bg-wafer-100 text-wafer-700',
  viewer: 'bg-white text-wafer-600 ring-1 ring-wafer-200',
};

export function RoleBadge({ role }: { role: ProjectRole }) {
  return <span className={`inline-flex rounded-full px-2 py-0.5 text-fine font-semibold ${tones[role]}`}>{ROLE_LABELS[role].label}</span>;
}
