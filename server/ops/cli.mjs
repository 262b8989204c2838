#!/usr/bin/env node
// `npm run cli -- <command> …`: runs the command line from its precompiled bundle (dist/cli/, see
// cli-bundle.mjs), building it first when the sources changed since the last build, so the code that
// runs is always the code in the tree. `node --import tsx server/cli/index.ts …` runs the same
// commands from source (the CLI tests do that).

import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { ensureCliBundle } from './cli-bundle.mjs';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
let entry;
try {
  ({ entry } = await ensureCliBundle(root));
} catch (e) {
  console.error(`error: ${e.message}`);
  process.exit(1);
}
// The bundle reads process.argv.slice(2) and sets process.exitCode itself, as index.ts does.
await import(pathToFileURL(entry).href);
