/**
 * The site file formats (server/formats): pure parse and write functions, line numbers of bad
 * rows, and round trips. No database.
 */
import { describe, expect, it } from 'vitest';
import {
  canonicalJson,
  checkRows,
  decodeText,
  detectFormat,
  importSites,
  ImportRefused,
  parseCsv,
  parseDesignJson,
  jsonErrorOffset,
  parsePlacement,
  parseXyz,
  writeCsv,
  writePlacement,
  writeXyz,
  type ImportContext,
  type Site,
} from '../../server/formats';
import { MAX_SITES } from '@contracts/design';

/** Si lattice constant a in nm, CODATA 2018. */
const A = 0.5431020511;
const Q = A / 4;
const CTX: ImportContext = { domain: { center: [0, 0, 0], halfExtentsNm: [20, 20, 20], boundary: { kind: 'multipole', order: 2 } }, latticeConstantNm: A };
const enc = (s: string) => new TextEncoder().encode(s);

/** Diamond lattice in units of a/4: all even with sum ≡ 0 (mod 4), or all odd with sum ≡ 3 (mod 4) (Kittel ch. 1; from memory). */
function isDiamond([i, j, k]: number[]): boolean {
  const m = (((i + j + k) % 4) + 4) % 4;
  const even = [i, j, k].every((v) => v % 2 === 0);
  const odd = [i, j, k].every((v) => Math.abs(v % 2) === 1);
  return (even && m === 0) || (odd && m === 3);
}

const SITES: Site[] = [
  { id: 'p1', species: 'P', position: [-16 * Q, -16 * Q, 0], electrons: 1 },
  { id: 'as 2', species: 'As', position: [16 * Q, 16 * Q, 0], electrons: 2, cluster: 'pair' },
  { id: 'b3', species: 'B', position: [Q, Q, Q], electrons: 0 },
];

describe('canonical JSON', () => {
  it('sorts keys at every depth, keeps array order and writes no whitespace', () => {
    // the definition (keys sorted, no whitespace), written out by hand for a small value: common practice
    expect(canonicalJson({ b: 1, a: [{ z: 2, y: 'x y' }, 3], c: { e: null, d: true } })).toBe('{"a":[{"y":"x y","z":2},3],"b":1,"c":{"d":true,"e":null}}');
    // order of keys in the input does not matter
    expect(canonicalJson({ x: 1, y: { q: 1, p: 2 } })).toBe(canonicalJson({ y: { p: 2, q: 1 }, x: 1 }));
    // numbers as JSON.stringify writes them (ECMA-262 Number::toString: shortest round-trip form)
    expect(canonicalJson([0.1, 1e-7, 0.5431020511])).toBe('[0.1,1e-7,0.5431020511]');
  });
});

describe('decodeText', () => {
  it('refuses NUL bytes and invalid UTF-8, drops a BOM and normalises line endings', () => {
    expect(decodeText(new Uint8Array([0x69, 0x64, 0x00, 0x41])).ok).toBe(false);
    // 0xC3 0x28 is an invalid two-byte sequence (Markus Kuhn's UTF-8 decoder stress test, from memory)
    const bad = decodeText(new Uint8Array([0x61, 0xc3, 0x28]));
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.message).toMatch(/UTF-8/);
    const ok = decodeText(new Uint8Array([0xef, 0xbb, 0xbf, ...enc('a\r\nb\rc\n')]));
    expect(ok).toEqual({ ok: true, text: 'a\nb\nc\n' });
  });
});

describe('CSV', () => {
  it('reads columns in any order with optional electrons (default 1)', () => {
    const r = parseCsv('Z_nm,species,id,x_nm,y_nm\n0,P,a,1.5,-2\n\n3,as,b,0,0\n');
    expect(r.errors).toEqual([]);
    expect(r.rows).toEqual([
      { line: 2, id: 'a', species: 'P', position: [1.5, -2, 0], electrons: 1 },
      { line: 4, id: 'b', species: 'as', position: [0, 0, 3], electrons: 1 },
    ]);
  });

  it('reports every kind of bad row with its 1-based line number in the file', () => {
    const text = [
      'id,species,x_nm,y_nm,z_nm,electrons', // 1
      'ok1,P,0,0,0,1', // 2
      'short,P,1.0862041', // 3: missing columns
      'txt,P,abc,0,0,1', // 4: text in a number
      'xe,Xe,2.172408204,0,0,1', // 5: unknown species
      'ok1,P,4.344816409,0,0,1', // 6: duplicate id
      'far,P,25,0,0,1', // 7: outside the 20 nm box
      'twin,As,0.00000001,0,0,1', // 8: snaps to the lattice point of ok1
      '"quoted', // 9-10: a quoted field spanning a line break
      'id",Sb,-4.344816409,0,0,2',
      'last,Bi,0,4.344816409,0,1', // 11
    ].join('\n');
    const { sites, errors } = checkRows(parseCsv(text), CTX);
    expect(sites.map((s) => s.id)).toEqual(['ok1', 'quoted\nid', 'last']);
    const byLine = new Map(errors.map((e) => [e.line, e.message]));
    expect([...byLine.keys()]).toEqual([3, 4, 5, 6, 7, 8]);
    expect(errors.filter((e) => e.line === 3).map((e) => e.message)).toEqual(['missing value in column y_nm', 'missing value in column z_nm']);
    expect(byLine.get(4)).toMatch(/x_nm holds "abc", not a number/);
    expect(byLine.get(5)).toMatch(/unknown species "Xe"/);
    expect(byLine.get(6)).toMatch(/repeats the id "ok1" of line 2/);
    expect(byLine.get(7)).toMatch(/outside the domain box/);
    expect(byLine.get(8)).toMatch(/same lattice point as "ok1" on line 2/);
  });

  it('a header without the required columns is reported on line 1 and reads no rows', () => {
    const r = parseCsv('name,x,y\na,1,2\n');
    expect(r.rows).toEqual([]);
    expect(r.errors[0]).toMatchObject({ line: 1 });
    expect(r.errors[0].message).toMatch(/id, species, x_nm/);
  });

  it('write then read gives the same sites, bit for bit', () => {
    const text = writeCsv(SITES);
    expect(text.split('\n')[0]).toBe('id,species,x_nm,y_nm,z_nm,electrons,cluster');
    const back = checkRows(parseCsv(text), CTX);
    expect(back.errors).toEqual([]);
    expect(back.sites).toEqual(SITES.map((s) => (s.cluster ? s : { ...s })));
  });
});

describe('XYZ', () => {
  it('reads symbol x y z in ångström as nm (1 Å = 0.1 nm, SI) with ids from symbol and order', () => {
    const r = parseXyz('2\nfrom a colleague\nP 10 0 -5 0.3\nsb 0 2.5 0\n');
    expect(r.errors).toEqual([]);
    expect(r.rows).toEqual([
      { line: 3, id: 'P1', species: 'P', position: [1, 0, -0.5], electrons: 1 },
      { line: 4, id: 'Sb2', species: 'sb', position: [0, 0.25, 0], electrons: 1 },
    ]);
  });

  it('reports a wrong count, a short line and a second frame with their lines', () => {
    expect(parseXyz('3\nc\nP 0 0 0\n').errors).toEqual([{ line: 1, message: 'the file announces 3 atoms but holds 1 atom line(s)' }]);
    const r = parseXyz('2\nc\nP 0 0\nAs 1 x 0\n1\nc\nP 0 0 0\n');
    expect(r.errors.map((e) => e.line)).toEqual([3, 4, 5]);
    expect(r.errors[0].message).toMatch(/missing z/);
    expect(r.errors[1].message).toMatch(/y holds "x"/);
  });

  it('write then read gives the same positions to 1e-15 nm', () => {
    const back = parseXyz(writeXyz(SITES, 'test'));
    expect(back.errors).toEqual([]);
    back.rows.forEach((r, i) => {
      expect(r.species).toBe(SITES[i].species);
      for (let k = 0; k < 3; k++) expect(Math.abs(r.position[k] - SITES[i].position[k])).toBeLessThan(1e-15);
    });
  });
});

describe('placement list', () => {
  it('writes a header with lattice constant, origin, axes and units, and integer lattice indices per site', () => {
    const text = writePlacement(SITES, { name: 'Test', latticeConstantNm: A });
    const lines = text.trim().split('\n');
    expect(lines[0]).toBe('# tetrawell-placement 1');
    expect(lines).toContain(`# lattice-constant-nm: ${A}`);
    expect(lines).toContain('# origin-nm: 0 0 0');
    expect(lines).toContain('# axes: x [100], y [010], z [001]');
    expect(lines).toContain('# index-unit: a/4');
    const data = lines.filter((l) => !l.startsWith('#'));
    expect(data[0]).toBe(`p1 P 1 -16 -16 0 ${-16 * Q} ${-16 * Q} 0 0`);
    expect(data[1].startsWith('"as 2" As 2 16 16 0 ')).toBe(true);
    for (const l of data) {
      const t = l.replace(/^"[^"]*"/, 'x').split(' ');
      const ix = t.slice(3, 6).map(Number);
      expect(ix.every(Number.isInteger)).toBe(true);
      expect(isDiamond(ix)).toBe(true);
    }
  });

  it('reads back the same sites, bit for bit', () => {
    const back = checkRows(parsePlacement(writePlacement(SITES, { name: 'Test', latticeConstantNm: A })), CTX);
    expect(back.errors).toEqual([]);
    expect(back.sites).toEqual(SITES.map(({ cluster: _c, ...s }) => s));
  });

  it('a site off the lattice keeps its exact position; its indices are of the nearest lattice point and offset_nm is the distance', () => {
    const off: Site = { id: 'free', species: 'P', position: [4 * Q + 0.01, 0.003, 0], electrons: 1 };
    const text = writePlacement([off], { name: 'Off', latticeConstantNm: A });
    const line = text.trim().split('\n').at(-1)!.split(' ');
    expect(line.slice(3, 6)).toEqual(['4', '0', '0']);
    expect(Number(line[9])).toBeCloseTo(Math.hypot(0.01, 0.003), 15);
    const back = checkRows(parsePlacement(text), CTX);
    expect(back.sites[0].position).toEqual(off.position);
  });

  it('a six-column line places the site on its lattice point; bad indices are reported with their line', () => {
    const text = ['# tetrawell-placement 1', `# lattice-constant-nm: ${A}`, '# origin-nm: 1 0 0', 'a P 1 4 4 0', 'b P 1 1 0 0', `c P 1 8 0 0 ${1 + 4 * Q} 0 0`, 'd P 1 2 2'].join('\n');
    const r = parsePlacement(text);
    expect(r.rows).toEqual([{ line: 4, id: 'a', species: 'P', electrons: 1, position: [1 + 4 * Q, 4 * Q, 0] }]);
    expect(r.errors.map((e) => e.line)).toEqual([5, 6, 7]);
    expect(r.errors[0].message).toMatch(/not a diamond-lattice site/);
    expect(r.errors[1].message).toMatch(/disagree/);
    expect(r.errors[2].message).toMatch(/missing column\(s\) k/);
  });

  it('refuses sites before the header', () => {
    expect(parsePlacement('a P 1 0 0 0\n').errors[0]).toMatchObject({ line: 1 });
  });
});

describe('design JSON', () => {
  it('reports each bad site with the line its object starts on', () => {
    const doc = {
      format: 'tetrawell-design',
      name: 'x',
      sites: [
        { id: 'a', species: 'P', position: [0, 0, 0], electrons: 1 },
        { id: 'b', species: 'P', position: ['1', 0, 0], electrons: 1 },
        { id: 'c', species: 'As', position: [2.172408204, 0, 0], electrons: 1, orbital: { model: 'gaussian', sigmaNm: 1 } },
      ],
    };
    const text = JSON.stringify(doc, null, 2);
    const lines = text.split('\n');
    const lineOf = (id: string) => lines.findIndex((l) => l.includes(`"id": "${id}"`)); // the "{" is one line above: 1-based = index
    const { sites, errors } = checkRows(parseDesignJson(text), CTX);
    expect(sites.map((s) => s.id)).toEqual(['a', 'c']);
    expect(sites[1].orbital).toEqual({ model: 'gaussian', sigmaNm: 1 });
    expect(errors).toHaveLength(1);
    expect(errors[0].line).toBe(lineOf('b'));
    expect(errors[0].message).toMatch(/position/);
  });

  it('a bare list of sites, on one line, and broken JSON with its line', () => {
    expect(parseDesignJson('[{"id":"a","species":"P","position":[0,0,0]}]').rows[0]).toMatchObject({ line: 1, electrons: 1 });
    const broken = parseDesignJson('{\n"sites": [\n{"id": }\n]}');
    expect(broken.errors[0].line).toBe(3);
    // the syntax checker agrees with JSON.parse (ECMA-262) on what is valid
    for (const t of ['{"a":[1,2,{"b":null}],"c":"x\\"y"}', '[]', '{}', ' -0.5e3 ']) expect(jsonErrorOffset(t)).toBe(-1);
    for (const t of ['{"a":1,}', '[1 2]', '{"a"}', '"open', '[01]', '{"a":1}x']) expect(jsonErrorOffset(t)).toBeGreaterThanOrEqual(0);
  });
});

describe('format detection and limits', () => {
  it('uses the extension, else the content', () => {
    expect(detectFormat('a.CSV', '')).toBe('csv');
    expect(detectFormat('a.xyz', '')).toBe('xyz');
    expect(detectFormat('chain.placement.txt', '')).toBe('placement');
    expect(detectFormat('d.json', '')).toBe('json');
    expect(detectFormat('upload', '  {"sites": []}')).toBe('json');
    expect(detectFormat('upload.txt', '# tetrawell-placement 1\n')).toBe('placement');
    expect(detectFormat('upload.txt', '3\ncomment\n')).toBe('xyz');
    expect(detectFormat('upload.txt', 'id;species;x_nm;y_nm;z_nm\n')).toBe('csv');
    expect(detectFormat('notes.txt', 'hello world\n')).toBeNull();
  });

  it('refuses unknown formats, binary files and more than MAX_SITES rows as a whole', () => {
    expect(() => importSites(enc('hello'), 'notes.txt', CTX)).toThrow(ImportRefused);
    expect(() => importSites(new Uint8Array([1, 0, 2]), 'a.csv', CTX)).toThrow(/NUL/);
    const rows = Array.from({ length: MAX_SITES + 1 }, (_, i) => `s${i},P,0,0,0`).join('\n');
    try {
      importSites(enc(`id,species,x_nm,y_nm,z_nm\n${rows}`), 'big.csv', CTX);
      expect.unreachable();
    } catch (e) {
      expect((e as ImportRefused).reason).toBe('too_many_rows');
    }
  });
});
