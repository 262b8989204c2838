/**
 * Frames on the byte stream between the server and its design-body process (designBody.ts ⇄ designBody.child.ts).
 *
 *   ┌──────┬────────────┬────────────┬───────────────────────┐
 *   │ type │ id (u32 BE)│ len (u32 BE)│ len bytes of payload │
 *   └──────┴────────────┴────────────┴───────────────────────┘
 *     1 B      4 B          4 B
 *
 * Why not Node's IPC messages: each message is serialised (v8.Serializer copies the bytes), framed (Buffer.concat
 * copies them again) and, on the reading side, joined and deserialised. For a 17 MB body in and its 17 MB stored text
 * out that was two copies and two fresh buffers per 64 KiB on the request thread, ~2.5× its CPU per PUT and four
 * times the collections. Here a payload goes to the socket as the Buffer it is, and the reader hands out views of the
 * pieces the socket gave it: no copy on either side except a header that straddles two pieces.
 */

export const FRAME_HEADER_BYTES = 9;

/** write one frame: the header, then the payload as it is (no copy) */
export function frameHeader(type: number, id: number, length: number): Buffer {
  const h = Buffer.allocUnsafe(FRAME_HEADER_BYTES);
  h[0] = type;
  h.writeUInt32BE(id, 1);
  h.writeUInt32BE(length, 5);
  return h;
}

export interface FrameHandler {
  /** a frame begins: `length` payload bytes follow (0: `end` is called at once) */
  start(type: number, id: number, length: number): void;
  /** the next part of the current frame's payload: a view of the piece read (a socket gives each read a buffer of its own, so it may be kept) */
  data(bytes: Buffer): void;
  end(): void;
}

/**
 * A reader for pieces as a socket delivers them: frames may span pieces and pieces may hold several frames.
 * Returns the function to call with each piece.
 */
export function frameReader(h: FrameHandler): (piece: Buffer) => void {
  const header = Buffer.allocUnsafe(FRAME_HEADER_BYTES);
  let headerHave = 0;
  /** payload bytes still to come in the current frame; -1 between frames */
  let left = -1;
  return (piece: Buffer) => {
    let at = 0;
    while (at < piece.byteLength) {
      if (left < 0) {
        const take = Math.min(FRAME_HEADER_BYTES - headerHave, piece.byteLength - at);
        piece.copy(header, headerHave, at, at + take);
        headerHave += take;
        at += take;
        if (headerHave < FRAME_HEADER_BYTES) return;
        headerHave = 0;
        left = header.readUInt32BE(5);
        h.start(header[0], header.readUInt32BE(1), left);
        if (left === 0) {
          left = -1;
          h.end();
        }
        continue;
      }
      const take = Math.min(left, piece.byteLength - at);
      h.data(piece.subarray(at, at + take));
      at += take;
      left -= take;
      if (left === 0) {
        left = -1;
        h.end();
      }
    }
  };
}
