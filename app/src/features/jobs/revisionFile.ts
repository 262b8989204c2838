// GET /api/projects/:projectId/revisions/:revisionId/files/:name → the file, streamed (a plain link: the browser saves it)
import type { revisionFileNames } from '@contracts/api';

export type RevisionFileName = (typeof revisionFileNames)[number];

export function revisionFileHref(projectId: number, revisionId: number, name: RevisionFileName): string {
  return `/api/projects/${projectId}/revisions/${revisionId}/files/${name}`;
}
