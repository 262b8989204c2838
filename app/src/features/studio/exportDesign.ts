// GET /api/projects/:projectId/designs/:designId/export?format=json|csv|xyz|placement → a download with a file name.
// Plain links: the browser downloads with the server's Content-Disposition name (the last saved version).
import { designExportFormats } from '@contracts/api';

export type ExportFormat = (typeof designExportFormats)[number];

export const EXPORT_LABELS: Record<ExportFormat, string> = {
  placement: 'Placement list (lattice indices and nm)',
  csv: 'CSV table of sites (nm)',
  xyz: 'XYZ coordinates (ångström)',
  json: 'Design document (JSON)',
};

export function exportHref(projectId: number, designId: number, format: ExportFormat): string {
  return `/api/projects/${projectId}/designs/${designId}/export?format=${format}`;
}

export const EXPORT_FORMATS: readonly ExportFormat[] = designExportFormats;
