/**
 * What the server and its design-body process say to each other (designBody.ts ⇄ designBody.child.ts), in frames
 * (frames.ts). Kept apart from the child's entry file, which starts listening when it is imported.
 */
import type { DesignBodyKind, DesignBodyResult, DesignBodyStore } from './designBodyParse';

/** frame types (frames.ts): server → body process */
export const BODY_FRAME = { config: 1, begin: 2, piece: 3, end: 4, abort: 5 } as const;
/** frame types: body process → server */
export const ANSWER_FRAME = { out: 16, result: 17 } as const;

export interface BeginFrame {
  kind: DesignBodyKind;
  length: number | null;
  store?: DesignBodyStore;
}

/**
 * RESULT's JSON: a result whose bytes came first as OUT frames says where they belong (`outBytes` in all): the stored
 * text of a written body (`stored`), or the jsonb bytes of a body ready to write (`write` without its bytes).
 */
export type AnswerResult =
  | Exclude<DesignBodyResult, { documentJson: Uint8Array } | { write: unknown }>
  | { ok: true; stored: Extract<DesignBodyResult, { stored: unknown }>['stored']; outBytes: number }
  | { ok: true; write: Omit<Extract<DesignBodyResult, { write: unknown }>['write'], 'documentJsonb'>; version: number | null; outBytes: number };

