/**
 * Bytes of an uploaded file → text, or a plain reason why it is not text we read:
 * invalid UTF-8 (WHATWG Encoding "fatal" decoder) or a NUL byte (a binary file; PostgreSQL
 * cannot store U+0000 either). A UTF-8 byte-order mark is dropped; line endings become "\n"
 * (CR LF and lone CR each end one line, so line numbers stay those an editor shows).
 */
export type TextResult = { ok: true; text: string } | { ok: false; message: string };

export function decodeText(bytes: Uint8Array): TextResult {
  if (bytes.includes(0)) return { ok: false, message: 'The file holds NUL bytes, so it is not a text file. Upload CSV, XYZ, a placement list or a design JSON.' };
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true, ignoreBOM: false }).decode(bytes);
  } catch {
    return { ok: false, message: 'The file is not valid UTF-8 text. Save it as UTF-8 (plain text) and upload it again.' };
  }
  return { ok: true, text: text.replace(/\r\n?/g, '\n') };
}
