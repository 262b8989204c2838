/**
 * Typed errors of the mesher. Every refusal carries a stable `code` so the server and the CLI
 * can map it to a plain-words message (and an HTTP status) without parsing the text.
 */
export type MeshErrorCode =
  /** an enclosure extent is zero, negative or not a finite number */
  | 'degenerate-box'
  /** the element-count estimate (or the running count) exceeds maxElements or the server cap */
  | 'too-many-elements'
  /** a size-field parameter is not a positive finite number */
  | 'bad-size-field'
  /** more bisection generations than the Uint8 level arrays can hold (255) */
  | 'level-overflow'
  /** a marker array whose length does not match the mesh */
  | 'bad-marker';

export class MeshError extends Error {
  readonly code: MeshErrorCode;
  /** optional figures behind the refusal (e.g. { estimate, limit }) for the caller to show */
  readonly details: Record<string, number>;

  constructor(code: MeshErrorCode, message: string, details: Record<string, number> = {}) {
    super(message);
    this.name = 'MeshError';
    this.code = code;
    this.details = details;
  }
}
