// The command line, precompiled: one esbuild bundle of server/cli/index.ts in dist/cli/, so that
// `npm run cli` starts in plain Node instead of transpiling every TypeScript file through tsx.
//
// Freshness: the bundle's folder is named after a fingerprint of everything it is built from, so a
// bundle is only ever run for exactly the sources it was built from (never stale code):
//   - the content (sha256) of every file under CLI_SOURCE_ROOTS, with its path (a new or deleted
//     file changes it too), read on every start: content, not mtimes, so a checkout or a copy that
//     keeps old times cannot hide a change;
//   - this file (the build options) and tsconfig.json (the @contracts alias);
//   - the installed packages the bundle takes in (zod, delaunator): size and mtime of npm's own
//     node_modules/.package-lock.json, which npm rewrites at the end of every install, and the
//     esbuild version and Node's major version.
// A build that takes in a source outside CLI_SOURCE_ROOTS and node_modules fails, so a new import
// cannot slip past the fingerprint (tests/ops/cliBundle.test.ts builds it).
//
// Plain Node with no dependency at start-up; esbuild (a dependency of tsx and vite) is imported only
// to build.

import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

/** Folders and files the command line is built from (paths relative to the project root). */
export const CLI_SOURCE_ROOTS = ['server/cli', 'server/contracts', 'server/coreErrors.ts', 'geometry'];
/** Files outside the roots that change what the bundle is (this script: the build options). */
const CONFIG_FILES = ['tsconfig.json', 'server/ops/cli-bundle.mjs'];
const ENTRY = 'server/cli/index.ts';
const SOURCE_EXT = /\.(?:ts|mts|js|mjs|json)$/;

function walk(root, rel, out) {
  const abs = path.join(root, rel);
  let st;
  try {
    st = fs.statSync(abs);
  } catch {
    return;
  }
  if (st.isFile()) {
    out.push(rel);
    return;
  }
  if (!st.isDirectory()) return;
  for (const e of fs.readdirSync(abs, { withFileTypes: true })) {
    if (e.name.startsWith('.') || e.name === 'node_modules') continue;
    const child = path.join(rel, e.name);
    if (e.isDirectory()) walk(root, child, out);
    else if (e.isFile() && SOURCE_EXT.test(e.name)) out.push(child);
  }
}

/** The fingerprint (hex) of the sources, options and packages a bundle built now would come from. */
export function cliFingerprint(root) {
  const h = createHash('sha256');
  const files = [];
  for (const r of [...CLI_SOURCE_ROOTS, ...CONFIG_FILES]) walk(root, r, files);
  files.sort();
  for (const f of files) {
    const data = fs.readFileSync(path.join(root, f));
    h.update(`${f.split(path.sep).join('/')}\0${data.length}\0`);
    h.update(data);
  }
  let installed = 'none';
  try {
    const st = fs.statSync(path.join(root, 'node_modules', '.package-lock.json'));
    installed = `${st.size}:${st.mtimeMs}`;
  } catch {
    /* a tree installed without npm: the esbuild version below still changes with an upgrade */
  }
  let esbuildVersion = 'none';
  try {
    esbuildVersion = JSON.parse(fs.readFileSync(path.join(root, 'node_modules', 'esbuild', 'package.json'), 'utf8')).version;
  } catch {
    /* esbuild missing: the build says so */
  }
  h.update(`\0installed ${installed}\0esbuild ${esbuildVersion}\0node ${process.versions.node.split('.')[0]}`);
  return h.digest('hex').slice(0, 24);
}

/** Where the bundle for a fingerprint lives. */
export function cliBundleDir(root, fingerprint) {
  return path.join(root, 'dist', 'cli', fingerprint);
}

function isUnder(rel, roots) {
  return roots.some((r) => rel === r || rel.startsWith(`${r}/`));
}

/**
 * Builds the bundle into dist/cli/<fingerprint>/ (a temporary folder renamed into place, so a
 * concurrent start never sees half a bundle) and removes bundles of other fingerprints that are
 * more than a minute old (a command started from one just now may still be loading its chunks).
 */
export async function buildCliBundle(root, fingerprint = cliFingerprint(root)) {
  let esbuild;
  try {
    esbuild = await import(path.join(root, 'node_modules', 'esbuild', 'lib', 'main.js'));
  } catch (e) {
    throw new Error(`cannot load esbuild to build the command line (${e.message}); run npm ci`, { cause: e });
  }
  const outRoot = path.join(root, 'dist', 'cli');
  fs.mkdirSync(outRoot, { recursive: true });
  const tmp = fs.mkdtempSync(path.join(outRoot, '.build-'));
  try {
    const result = await (esbuild.default ?? esbuild).build({
      absWorkingDir: root,
      entryPoints: { index: ENTRY },
      outdir: tmp,
      bundle: true,
      // one chunk per command, loaded by index.ts's dynamic import: `check` loads neither the mesher
      // nor the finite elements
      splitting: true,
      format: 'esm',
      platform: 'node',
      target: `node${process.versions.node.split('.')[0]}`,
      outExtension: { '.js': '.mjs' },
      // function and class names as written (an error's name reaches the user's words)
      keepNames: true,
      tsconfig: path.join(root, 'tsconfig.json'),
      metafile: true,
      logLevel: 'silent',
      legalComments: 'none',
      // less text for V8 to parse at each start; names stay as written
      minifyWhitespace: true,
      minifySyntax: true,
    });
    const outside = Object.keys(result.metafile.inputs)
      .map((p) => p.split(path.sep).join('/'))
      .filter((p) => !p.startsWith('node_modules/') && !p.includes('/node_modules/') && !isUnder(p, CLI_SOURCE_ROOTS));
    if (outside.length)
      throw new Error(
        `the command line imports ${outside.join(', ')}, outside the folders its freshness check reads; add them to CLI_SOURCE_ROOTS in server/ops/cli-bundle.mjs`,
      );
    // what each chunk holds and loads, for people and for tests (tests/ops/cliBundle.test.ts)
    const chunks = {};
    for (const [file, o] of Object.entries(result.metafile.outputs)) {
      chunks[path.basename(file)] = {
        inputs: Object.keys(o.inputs).map((p) => p.split(path.sep).join('/')).sort(),
        imports: o.imports.filter((i) => !i.external).map((i) => path.basename(i.path)),
        entry: o.entryPoint ?? null,
      };
    }
    fs.writeFileSync(path.join(tmp, 'chunks.json'), `${JSON.stringify(chunks, null, 1)}\n`);
    const dir = cliBundleDir(root, fingerprint);
    try {
      fs.renameSync(tmp, dir);
    } catch (e) {
      // another start built the same fingerprint first: use that one
      if (e.code !== 'ENOTEMPTY' && e.code !== 'EEXIST') throw e;
      fs.rmSync(tmp, { recursive: true, force: true });
    }
    const now = Date.now();
    for (const e of fs.readdirSync(outRoot, { withFileTypes: true })) {
      if (!e.isDirectory() || e.name === fingerprint) continue;
      const p = path.join(outRoot, e.name);
      try {
        if (now - fs.statSync(p).mtimeMs > 60_000) fs.rmSync(p, { recursive: true, force: true });
      } catch {
        /* removed by another start */
      }
    }
    return path.join(dir, 'index.mjs');
  } catch (e) {
    fs.rmSync(tmp, { recursive: true, force: true });
    if (e && Array.isArray(e.errors) && e.errors.length) {
      const lines = e.errors.slice(0, 10).map((m) => (m.location ? `${m.location.file}:${m.location.line}:${m.location.column}: ${m.text}` : m.text));
      throw new Error(`cannot build the command line:\n  ${lines.join('\n  ')}`, { cause: e });
    }
    throw e;
  }
}

/** The bundle's entry for the current sources, built first when there is none (or `force`). */
export async function ensureCliBundle(root, { force = false } = {}) {
  const fingerprint = cliFingerprint(root);
  const entry = path.join(cliBundleDir(root, fingerprint), 'index.mjs');
  if (!force && fs.existsSync(entry)) return { entry, built: false };
  return { entry: await buildCliBundle(root, fingerprint), built: true };
}

// `node server/ops/cli-bundle.mjs`: build now (part of `npm run build`).
if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
  ensureCliBundle(root).then(
    ({ entry, built }) => console.log(`${built ? 'built' : 'up to date'}: ${path.relative(root, entry)}`),
    (e) => {
      console.error(e.message);
      process.exitCode = 1;
    },
  );
}
