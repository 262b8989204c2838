/**
 * The README's worked example (issue 11 "Done when"): the design file behind the table must stay a
 * valid version-2 document that `check` passes cleanly, so the command the README shows works as
 * written. Cheap: `check` only; the table itself comes from a `coulomb` run recorded in the README.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { designSchema } from '@contracts/design';

const root = fileURLToPath(new URL('../../..', import.meta.url));
const fixture = join(root, 'tests/fixtures/designs/buried-quad-gates.json');

describe('README worked example (tests/fixtures/designs/buried-quad-gates.json)', () => {
  it('is a valid design document: four donors under a 5 nm oxide, two gates on the oxide', () => {
    const doc = JSON.parse(readFileSync(fixture, 'utf8'));
    const parsed = designSchema.safeParse(doc);
    expect(parsed.success ? [] : parsed.error.issues).toEqual([]);
    expect(doc.sites).toHaveLength(4);
    expect(doc.electrodes).toHaveLength(2);
    const oxide = doc.host.layers.find((l: { name: string }) => l.name === 'oxide');
    expect(oxide.zMaxNm - oxide.zMinNm).toBe(5);
    // every gate sits on the oxide's top face
    for (const e of doc.electrodes) expect(e.minNm[2]).toBe(oxide.zMaxNm);
  });

  it('checks clean: exit 0, no warnings, the far-field bound under the target, and the stack raises U (Jackson §4.4: a lower εr above gives a like-signed image)', () => {
    const r = spawnSync(process.execPath, ['--import', 'tsx', 'server/cli/index.ts', 'check', fixture, '--json'], { cwd: root, encoding: 'utf8' });
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.warnings).toEqual([]);
    expect(j.worstRelBound).toBeLessThan(j.tolerance);
    expect(j.sites).toHaveLength(4);
    expect(j.pairs).toHaveLength(6);
    // image charge q' = q (ε1 − ε2)/(ε1 + ε2) > 0 for silicon (11.7) under oxide (3.9): U grows
    expect(j.imageEffect.worstURel).toBeGreaterThan(0);
  });
});
