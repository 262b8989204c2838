/**
 * server/cli/json-out.ts writes `check --json` in pieces: its text must be the text of
 * console.log(JSON.stringify(value, null, 2)) — the reference is JSON.stringify itself (ECMA-262
 * §25.5.2) — whatever the values, the nesting and the piece size; and the CLI's rows, made from the
 * far-field columns, must print exactly what toCheckJson of the object report prints.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { Rows, writePrettyJson } from '../../../server/cli/json-out';
import { toCheckJson, toCheckJsonRows } from '../../../server/cli/check';
import { farFieldCheck, farFieldColumns } from '../../../geometry/farfield';
import { generateArray } from '../../../geometry/arrays';
import { mulberry32 } from '../../../geometry/arrays/prng';
import type { Design } from '../../../geometry/design/types';
import { siliconOxideVacuum } from '../../fixtures/stacks';

/** What console.log(piece) would put on stdout for each piece, joined. */
function printed(value: unknown, pieceChars?: number): { text: string; pieces: number } {
  const out: string[] = [];
  writePrettyJson(value, (p) => out.push(`${p}\n`), pieceChars);
  return { text: out.join(''), pieces: out.length };
}
const reference = (value: unknown) => `${JSON.stringify(value, null, 2)}\n`;

function randomValue(rand: () => number, depth: number): unknown {
  const r = rand();
  if (depth > 3 || r < 0.35) {
    const pick = Math.floor(rand() * 14);
    return [
      null, true, false, 0, -0, 1e21, 1e-7, -123.456, Number.NaN, Infinity, -Infinity, undefined,
      `s"\\\n\t\u0001é\u2028${String.fromCharCode(0xd800)}😀`, rand(),
    ][pick];
  }
  if (r < 0.6) return Array.from({ length: Math.floor(rand() * 5) }, () => randomValue(rand, depth + 1));
  const o: Record<string, unknown> = {};
  for (let k = Math.floor(rand() * 5); k > 0; k--) o[['a', 'b c', '1', '0', 'é', '"q"', 'fn'][Math.floor(rand() * 7)]] = randomValue(rand, depth + 1);
  if (rand() < 0.1) o.fn = () => 1;
  return o;
}

describe('writePrettyJson prints what JSON.stringify(value, null, 2) prints', () => {
  it('scalars, empty and nested containers, escapes, non-finite numbers, undefined and functions, toJSON', () => {
    const values: unknown[] = [
      null, 0, -0, 5e-324, 1.7976931348623157e308, NaN, -Infinity, 'x', '', true,
      [], {}, [[]], { a: {} }, [undefined, () => 1, Symbol('s')], { u: undefined, f: () => 1, s: 'ok' },
      { toJSON: () => ({ made: [1, 2] }) }, { d: new Date(0) }, { inner: { toJSON: (k: string) => `key ${k}` } },
      [new Number(3), new String('boxed'), new Boolean(false)], { 2: 'b', 1: 'a', z: 'z', 0: 'zero' },
    ];
    for (const v of values) expect(printed(v).text, String(JSON.stringify(v))).toBe(reference(v));
  });

  it('500 random values, cut into pieces of every size from 1 character up, give the same text', () => {
    const rand = mulberry32(20261202);
    for (let t = 0; t < 500; t++) {
      const v = randomValue(rand, 0);
      const size = 1 + Math.floor(rand() * 200);
      expect(printed(v, size).text).toBe(reference(v));
    }
  });

  it('Rows print as the array of their rows, in several pieces when long', () => {
    const rows = new Rows(5000, (i) => ({ id: `s${i}`, x: i / 7, y: i % 3 ? null : [i, 'a'] }));
    const array = Array.from({ length: rows.length }, (_, i) => rows.at(i));
    const { text, pieces } = printed({ head: 1, rows, empty: new Rows(0, () => 1), tail: [rows] }, 4096);
    expect(text).toBe(reference({ head: 1, rows: array, empty: [], tail: [array] }));
    expect(pieces).toBeGreaterThan(50);
  });
});

describe('check --json rows from the far-field columns', () => {
  const root = fileURLToPath(new URL('../../..', import.meta.url));
  const plaquette = JSON.parse(readFileSync(`${root}tests/fixtures/designs/plaquette.json`, 'utf8')) as Design;
  const a = plaquette.host.latticeConstantNm;
  // a 12×12 array (bond-graph pairs) whose outer columns stand outside the box (null site and
  // pair bounds), with two sites at one position (that pair is left out of the pairs)
  const big: Design = structuredClone(plaquette);
  big.sites = generateArray({ kind: 'square', nx: 12, ny: 12, spacingNm: 4 * a, latticeConstantNm: a });
  big.domain = { ...big.domain, halfExtentsNm: [11, 40, 40] };
  big.sites[7] = { ...big.sites[7], position: [...big.sites[8].position] };
  const grounded: Design = { ...structuredClone(plaquette), domain: { ...plaquette.domain, boundary: { kind: 'grounded' } } };
  // an invented stack (silicon under 5 nm of oxide, vacuum above) with a gate on the oxide and a
  // lead half outside the box: the rows carry boundKind/boundReason and the object imageEffect
  const stack = (d: Design): Design => ({
    ...structuredClone(d),
    host: {
      ...d.host,
      layers: siliconOxideVacuum(),
    },
    sites: d.sites.map((s) => ({ ...s, position: [s.position[0], s.position[1], -10 * a] })),
    domain: { ...d.domain, center: [0, 0, -10] },
    electrodes: [
      { name: 'gate', minNm: [-5, -5, 5], maxNm: [5, 5, 8], voltageV: 0.5 },
      { name: 'lead', minNm: [d.domain.halfExtentsNm[0] - 5, -2, -11], maxNm: [d.domain.halfExtentsNm[0] + 5, 2, -9], voltageV: 0 },
    ],
  });
  const layered = stack(plaquette);
  const layeredBig = stack({ ...big, sites: big.sites.filter((_, i) => i !== 7), domain: { ...big.domain, halfExtentsNm: [40, 40, 40] } });

  for (const [name, d] of [
    ['plaquette', plaquette],
    ['12×12 with sites outside and two at one place', big],
    ['grounded plaquette', grounded],
    ['plaquette under an oxide with a gate and a lead', layered],
    ['12×12 under an oxide with a gate and a lead (bond-graph pairs)', layeredBig],
  ] as const) {
    it(`${name}: same text as JSON.stringify(toCheckJson(farFieldCheck(…)), null, 2)`, () => {
      const estimateElements = () => ({ elements: 1234, atLeast: true });
      const objects = toCheckJson(farFieldCheck(d, { estimateElements }));
      if (d === big) {
        // the case holds what it is meant to: null bounds and a left-out pair
        expect(objects.sites.some((s) => s.uBoundEv === null)).toBe(true);
        expect(objects.pairs.some((p) => p.vBoundEv === null)).toBe(true);
        expect(objects.warnings.map((w) => w.code)).toEqual(expect.arrayContaining(['site-outside-domain', 'sites-coincide']));
      }
      if (d === layered || d === layeredBig) {
        // the layered keys are there to compare
        expect(objects.imageEffect).toBeDefined();
        expect(objects.sites.every((s) => 'boundKind' in s && 'boundReason' in s)).toBe(true);
        expect(objects.pairs.length).toBeGreaterThan(0);
      }
      const columns = farFieldColumns(d, { estimateElements });
      expect(printed(toCheckJsonRows(columns), 512).text).toBe(reference(objects));
      // with --moments, the same key order and values
      const withMoments = farFieldCheck(d, { moments: true });
      const colsMoments = farFieldColumns(d, { moments: true });
      expect(printed({ ...toCheckJsonRows(colsMoments), moments: colsMoments.head.moments }).text).toBe(
        reference({ ...toCheckJson(withMoments), moments: withMoments.moments }),
      );
    });
  }
});
