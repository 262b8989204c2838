/**
 * Refusals of the mesher: CoreError (geometry/errors.ts) with the mesher's codes, so the server and
 * the CLI map them to words (and an HTTP status) without parsing the text.
 */
import { CoreError } from '../errors';

export type MeshErrorCode = 'degenerate-box' | 'too-many-elements' | 'bad-size-field' | 'level-overflow' | 'bad-marker';

export class MeshError extends CoreError<MeshErrorCode> {
  /** figures behind the refusal (e.g. { estimate, limit }) for the caller to show */
  declare readonly details: Record<string, number>;

  constructor(code: MeshErrorCode, message: string, details: Record<string, number> = {}) {
    super(code, message, details);
    this.name = 'MeshError';
  }
}
