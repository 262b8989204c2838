/** piscina worker: the CPU-heavy parts of design saves and imports (see designFigures.ts). */
import type { DesignDocument } from '@contracts/design';
import { computeFigures, type DesignFigures, type ImportOutcome } from './designFigures';
import { importSites, ImportRefused, type ImportContext } from '../formats';
import { lowerThreadPriority } from './lowPriority';

// requests and the database come first on a busy machine (server/workers/lowPriority.ts)
lowerThreadPriority();

/** JSON text of a (validated) design document → its stored figures. */
export default function run(documentJson: string): DesignFigures {
  return computeFigures(JSON.parse(documentJson) as DesignDocument);
}

/** An uploaded file → sites and bad rows; a refusal travels back as data (errors lose their class across threads). */
export function importFile(task: { bytes: Uint8Array; fileName: string; ctx: ImportContext }): ImportOutcome {
  try {
    return { ok: true, result: importSites(task.bytes, task.fileName, task.ctx) };
  } catch (e) {
    if (e instanceof ImportRefused) return { ok: false, reason: e.reason, message: e.message };
    throw e;
  }
}
