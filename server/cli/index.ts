/**
 * `npm run cli -- <command> ...`: the command-line entry.
 * Each command lives in its own file and exports `run(argv): Promise<number>` (the exit code).
 */
const commands: Record<string, { file: string; summary: string }> = {
  check: { file: './check', summary: 'far-field check of a design: boundary error bounds and a safe domain size' },
  mesh: { file: './mesh', summary: 'build a graded tetrahedral mesh and write it as .vtu, .vtk or binary' },
  coulomb: { file: './coulomb', summary: 'solve for on-site U and inter-site V with P1 or P2 elements' },
  convergence: { file: './convergence', summary: 'convergence sweep over refinement levels or domain sizes' },
  submit: { file: './submit', summary: 'remote mode: store a design on a server, start a job, follow it, download the result' },
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
  const mod = (await import(command.file)) as { run: (argv: string[]) => Promise<number> };
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
