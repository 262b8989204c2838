/**
 * geometry/ runs in the browser too (the studio's far-field worker imports it): the lint rule for
 * geometry/** refuses Node modules and Node globals (`eslint .` in `npm test` holds every file of
 * geometry/ to it). The type-level
 * twin is tsconfig.geometry.json (no Node types), run by `npm run typecheck`.
 */
import { describe, expect, it } from 'vitest';
import { ESLint } from 'eslint';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../../../', import.meta.url));
const eslint = new ESLint({ cwd: root });

async function ruleIds(code: string, file = 'geometry/fem/probe.ts'): Promise<string[]> {
  const [r] = await eslint.lintText(code, { filePath: path.join(root, file) });
  return r.messages.map((m) => m.ruleId ?? m.message);
}

describe('geometry/ stays free of Node', () => {
  it('refuses node:* imports, bare Node modules and piscina', async () => {
    expect(await ruleIds("import { readFileSync } from 'node:fs';\nexport const f = readFileSync;\n")).toContain('no-restricted-imports');
    expect(await ruleIds("import { MessagePort } from 'worker_threads';\nexport type P = MessagePort;\n")).toContain('no-restricted-imports');
    expect(await ruleIds("import Piscina from 'piscina';\nexport const P = Piscina;\n")).toContain('no-restricted-imports');
  });

  it('refuses Node globals', async () => {
    expect(await ruleIds('export const env = process.env;\n')).toContain('no-restricted-globals');
    expect(await ruleIds("export const b = Buffer.from('x');\n")).toContain('no-restricted-globals');
  });

  it('allows the same code outside geometry/ and plain typed-array code inside it', async () => {
    expect(await ruleIds("import { readFileSync } from 'node:fs';\nexport const f = readFileSync;\n", 'server/cli/probe.ts')).not.toContain('no-restricted-imports');
    expect(await ruleIds('export const a = new Float64Array(3);\n')).toEqual([]);
  });
});
