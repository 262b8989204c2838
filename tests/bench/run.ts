/**
 * `npm run bench`: prints speed and memory figures. Benchmarks never assert timings;
 * they print numbers for people to read and compare with the targets in the issues.
 * Each bench file exports `run(): Promise<void>`; missing ones are reported, not fatal.
 */
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';

const here = dirname(fileURLToPath(import.meta.url));
const benches = ['farfield.bench.ts', 'mesh.bench.ts', 'fem.bench.ts', 'fem-array.bench.ts', 'load.bench.ts', 'jobs.bench.ts', 'host.bench.ts'];
const only = process.argv.slice(2);

for (const file of benches) {
  if (only.length > 0 && !only.some((o) => file.startsWith(o))) continue;
  const path = join(here, file);
  if (!existsSync(path)) {
    console.log(`\n== ${file}: not present`);
    continue;
  }
  console.log(`\n== ${file}`);
  const mod = (await import(path)) as { run: () => Promise<void> };
  await mod.run();
}
