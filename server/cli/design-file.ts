/**
 * Reading a design file for every CLI command: unreadable files, bad JSON and invalid documents
 * each get plain words on stderr (field path and what is wrong), never a stack trace.
 */
import { readFile } from 'node:fs/promises';
import { describeIssues, parseDesign } from '@contracts/design';
import type { Design } from '../../geometry/design/types';

/** Read and validate a design file; prints the problems and returns null on failure. */
export async function readDesign(file: string, json: boolean): Promise<Design | null> {
  let text: string;
  try {
    text = await readFile(file, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    console.error(`cannot read ${file}: ${code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'it is a folder' : (e as Error).message}`);
    return null;
  }
  // A UTF-8 byte-order mark (some Windows editors write one) is not JSON: drop it (RFC 8259 §8.1
  // lets a parser ignore it).
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  let doc: unknown;
  try {
    doc = JSON.parse(text);
  } catch (e) {
    console.error(`${file} is not valid JSON: ${(e as Error).message}`);
    return null;
  }
  const parsed = parseDesign(doc);
  if (!parsed.ok) {
    console.error(`${file} is not a valid design document:`);
    for (const line of describeIssues(parsed.issues.slice(0, 50))) console.error(`  ${line}`);
    if (parsed.issues.length > 50) console.error(`  … and ${parsed.issues.length - 50} more`);
    if (json) console.log(JSON.stringify({ valid: false, issues: parsed.issues }));
    return null;
  }
  return parsed.design as Design;
}
