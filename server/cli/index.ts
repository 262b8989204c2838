/**
 * `npm run cli -- <command> ...`: the command-line entry.
 * Each command lives in its own file and exports `run(argv): Promise<number>` (the exit code).
 */
type Command = { run: (argv: string[]) => Promise<number> };
// Literal dynamic imports: each command loads only its own modules (`check` neither the mesher nor the
// finite elements), and the bundle (server/ops/cli-bundle.mjs) puts each command in a chunk of its own.
const commands: Record<string, { load: () => Promise<Command>; summary: string }> = {
  check: { load: () => import('./check'), summary: 'far-field check of a design: boundary error bounds and a safe domain size' },
  mesh: { load: () => import('./mesh'), summary: 'build a graded tetrahedral mesh and write it as .vtu, .vtk or binary' },
  coulomb: { load: () => import('./coulomb'), summary: 'solve for on-site U and inter-site V with P1 or P2 elements' },
  convergence: { load: () => import('./convergence'), summary: 'convergence sweep over refinement levels or domain sizes' },
  submit: { load: () => import('./submit'), summary: 'remote mode: store a design on a server, start a job, follow it, download the result' },
};

function usage(): string {
  const lines = ['usage: npm run cli -- <command> <design.json> [options]', '', 'commands:'];
  for (const [name, c] of Object.entries(commands)) lines.push(`  ${name.padEnd(11)} ${c.summary}`);
  return lines.join('\n');
}

async function main(argv: string[]): Promise<number> {
  const [name, ...rest] = argv;
  if (!name || name === '--help' || name === '-h') {
    console.log(usage());
    return name ? 0 : 2;
  }
  const command = commands[name];
  if (!command) {
    console.error(`unknown command "${name}"\n\n${usage()}`);
    return 2;
  }
  const mod = await command.load();
  return mod.run(rest);
}

main(process.argv.slice(2)).then(
  (code) => {
    process.exitCode = code;
  },
  (err: unknown) => {
    // Never a stack trace for the user: one plain line.
    console.error(`error: ${err instanceof Error ? err.message : String(err)}`);
    process.exitCode = 1;
  },
);
