/** piscina worker: JSON text of a (validated) design document → its stored figures. */
import type { DesignDocument } from '@contracts/design';
import { computeFigures, type DesignFigures } from './designFigures';

export default function run(documentJson: string): DesignFigures {
  return computeFigures(JSON.parse(documentJson) as DesignDocument);
}
