/**
 * `npm run cli -- submit <design.json> --server URL --token T --kind mesh|coulomb|convergence
 *    [--order 1|2] [--sweep refinement|box] [--project ID] [--design ID] [--wait] [--out FILE]`
 *
 * Remote mode (issue 10, "Scripted use"): drives a Tetrawell server with a personal API token
 * (`Authorization: Bearer`). Checks the document locally first (same messages as the other
 * commands), stores it on the server (a new design; a new version of design ID with --design; in
 * project ID with --project, else in a new project named after the file), starts the job and
 * prints its id. --wait follows the job (polling its state) with progress lines on stderr;
 * --out (implies --wait) downloads the revision's mesh.vtu (kind mesh) or results.json (the others)
 * to FILE. The last line on stdout is one JSON object: { projectId, designId, designVersion, jobId,
 * state, revisionId, reused, file }.
 * The token may also come from the environment variable TETRAWELL_TOKEN (kept out of shell history).
 * Exit codes: 0 done (or queued without --wait), 1 invalid document, server refusal, failed or
 * cancelled job, unwritable file; 2 usage.
 */
import { createWriteStream } from 'node:fs';
import path from 'node:path';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { parseArgs } from 'node:util';
import { readFile } from 'node:fs/promises';
import { readDesign } from './design-file';

const USAGE =
  'usage: npm run cli -- submit <design.json> --server URL --token T --kind mesh|coulomb|convergence ' +
  '[--order 1|2] [--sweep refinement|box] [--project ID] [--design ID] [--wait] [--out FILE] [--poll MS]';

const KINDS = ['mesh', 'coulomb', 'convergence'] as const;
type Kind = (typeof KINDS)[number];

interface Args {
  file: string;
  server: string;
  token: string;
  kind: Kind;
  order?: 1 | 2;
  sweep?: 'refinement' | 'box';
  project?: number;
  design?: number;
  wait: boolean;
  out?: string;
  pollMs: number;
}

interface JobView {
  id: number;
  state: string;
  progress: { phase: string; fraction: number; level?: number; site?: string };
  revisionId: number | null;
  error: string | null;
  reused?: boolean;
}

class RemoteError extends Error {}

function positiveId(value: string | undefined, flag: string): number | undefined | string {
  if (value === undefined) return undefined;
  return /^[1-9]\d{0,9}$/.test(value) ? Number(value) : `${flag} must be a positive whole number, not "${value}"`;
}

/** Parses argv with node:util parseArgs; a string is the problem to print with the usage line. */
export function parseSubmitArgs(argv: string[], env: NodeJS.ProcessEnv = process.env): Args | string {
  let parsed;
  try {
    parsed = parseArgs({
      args: argv,
      allowPositionals: true,
      strict: true,
      options: {
        server: { type: 'string' },
        token: { type: 'string' },
        kind: { type: 'string' },
        order: { type: 'string' },
        sweep: { type: 'string' },
        project: { type: 'string' },
        design: { type: 'string' },
        wait: { type: 'boolean', default: false },
        out: { type: 'string' },
        poll: { type: 'string' },
        help: { type: 'boolean', default: false },
      },
    });
  } catch (e) {
    return (e as Error).message;
  }
  const v = parsed.values;
  if (v.help) return '';
  if (parsed.positionals.length !== 1) return 'give exactly one design file';
  if (!v.server) return '--server is required (for example --server https://tetrawell.example.org)';
  const token = v.token ?? env.TETRAWELL_TOKEN;
  if (!token) return '--token is required (or set TETRAWELL_TOKEN); create one in your account settings';
  if (!v.kind || !(KINDS as readonly string[]).includes(v.kind)) return `--kind must be one of ${KINDS.join(', ')}`;
  const kind = v.kind as Kind;
  if (v.order !== undefined && v.order !== '1' && v.order !== '2') return '--order must be 1 or 2';
  if (v.sweep !== undefined && v.sweep !== 'refinement' && v.sweep !== 'box') return '--sweep must be refinement or box';
  if (v.sweep !== undefined && kind !== 'convergence') return '--sweep only applies to --kind convergence';
  const project = positiveId(v.project, '--project');
  if (typeof project === 'string') return project;
  const design = positiveId(v.design, '--design');
  if (typeof design === 'string') return design;
  if (design !== undefined && project === undefined) return '--design needs --project (the project the design is in)';
  let url: URL;
  try {
    url = new URL(v.server);
  } catch {
    return `--server is not a URL: "${v.server}"`;
  }
  if (url.protocol !== 'http:' && url.protocol !== 'https:') return '--server must start with http:// or https://';
  let pollMs = 1000;
  if (v.poll !== undefined) {
    pollMs = Number(v.poll);
    if (!Number.isFinite(pollMs) || pollMs < 50) return '--poll must be a number of milliseconds, at least 50';
  }
  return {
    file: parsed.positionals[0]!,
    server: url.origin + url.pathname.replace(/\/+$/, ''),
    token,
    kind,
    order: v.order === undefined ? undefined : (Number(v.order) as 1 | 2),
    sweep: v.sweep as Args['sweep'],
    project,
    design,
    wait: v.wait || v.out !== undefined,
    out: v.out,
    pollMs,
  };
}

function client(args: Args) {
  async function call(method: string, route: string, body?: string): Promise<{ status: number; json: Record<string, unknown> }> {
    let res: Response;
    try {
      res = await fetch(`${args.server}/api${route}`, {
        method,
        headers: { Authorization: `Bearer ${args.token}`, Accept: 'application/json', ...(body !== undefined ? { 'Content-Type': 'application/json' } : {}) },
        body,
      });
    } catch (e) {
      const cause = (e as { cause?: { code?: string; message?: string } }).cause;
      throw new RemoteError(`cannot reach ${args.server}: ${cause?.code ?? cause?.message ?? (e as Error).message}`);
    }
    const text = await res.text();
    let json: Record<string, unknown> = {};
    try {
      json = text ? (JSON.parse(text) as Record<string, unknown>) : {};
    } catch {
      throw new RemoteError(`${method} ${route}: the server answered ${res.status} with something that is not JSON`);
    }
    if (res.status >= 400) {
      const err = json.error as { message?: string; details?: { path: (string | number)[]; message: string }[] } | undefined;
      const lines = [`the server refused ${method} ${route} (${res.status}): ${err?.message ?? res.statusText}`];
      for (const d of err?.details?.slice(0, 20) ?? []) lines.push(`  ${d.path.join('.') || '(body)'}: ${d.message}`);
      throw new RemoteError(lines.join('\n'));
    }
    return { status: res.status, json };
  }
  return { call };
}

function describeProgress(job: JobView): string {
  const p = job.progress;
  const where = [p.level !== undefined ? `level ${p.level}` : '', p.site ? `site ${p.site}` : ''].filter(Boolean).join(', ');
  return `job ${job.id}: ${job.state}, ${p.phase}${where ? ` (${where})` : ''} ${Math.round(p.fraction * 100)} %`;
}

async function download(args: Args, route: string, out: string): Promise<number> {
  let res: Response;
  try {
    res = await fetch(`${args.server}/api${route}`, { headers: { Authorization: `Bearer ${args.token}` } });
  } catch (e) {
    throw new RemoteError(`cannot reach ${args.server}: ${(e as Error).message}`);
  }
  if (res.status !== 200 || !res.body) throw new RemoteError(`the server refused GET ${route} (${res.status})`);
  let bytes = 0;
  const counted = Readable.fromWeb(res.body as import('node:stream/web').ReadableStream<Uint8Array>);
  counted.on('data', (chunk: Buffer) => (bytes += chunk.length));
  try {
    // streamed to the file piece by piece: a large mesh is never held whole in memory
    await pipeline(counted, createWriteStream(out));
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new RemoteError(`cannot write ${out}: ${code === 'ENOENT' ? 'no such folder' : code === 'EISDIR' ? 'it is a folder' : (e as Error).message}`);
  }
  return bytes;
}

export async function run(argv: string[]): Promise<number> {
  const args = parseSubmitArgs(argv);
  if (typeof args === 'string') {
    if (args === '') {
      console.log(USAGE);
      return 0;
    }
    console.error(`${args}\n${USAGE}`);
    return 2;
  }
  // the same local check and messages as the other commands, before anything is sent
  if (!(await readDesign(args.file, false))) return 1;
  const documentText = await readFile(args.file, 'utf8');
  const document = JSON.parse(documentText.charCodeAt(0) === 0xfeff ? documentText.slice(1) : documentText) as unknown;
  const { call } = client(args);

  try {
    let projectId = args.project;
    const baseName = path.basename(args.file).replace(/\.json$/i, '').slice(0, 80) || 'design';
    if (projectId === undefined) {
      const p = await call('POST', '/projects', JSON.stringify({ name: `${baseName} (submitted)`.slice(0, 80) }));
      projectId = p.json.id as number;
      console.error(`created project ${projectId} "${p.json.name as string}" (pass --project ${projectId} to reuse it)`);
    }
    let designId: number;
    let designVersion: number;
    if (args.design !== undefined) {
      const current = await call('GET', `/projects/${projectId}/designs/${args.design}`);
      const version = (current.json.design as { version: number }).version;
      const saved = await call('PUT', `/projects/${projectId}/designs/${args.design}`, JSON.stringify({ document, version }));
      designId = args.design;
      designVersion = (saved.json.design as { version: number }).version;
      console.error(`saved design ${designId} as version ${designVersion}`);
    } else {
      // the document's own name, so the stored document (whose name is the design's) stays the file's content
      const docName = (document as { name?: unknown }).name;
      const name = typeof docName === 'string' && docName.trim() ? docName.trim().slice(0, 80) : baseName;
      const created = await call('POST', `/projects/${projectId}/designs`, JSON.stringify({ name, document }));
      designId = (created.json.design as { id: number }).id;
      designVersion = (created.json.design as { version: number }).version;
      console.error(`created design ${designId} (version ${designVersion})`);
    }

    const options: Record<string, unknown> = {};
    if (args.order !== undefined) options.order = args.order;
    if (args.sweep !== undefined) options.sweep = args.sweep;
    const started = await call('POST', `/projects/${projectId}/designs/${designId}/jobs`, JSON.stringify({ kind: args.kind, options }));
    let job = started.json.job as JobView;
    console.error(job.reused ? `job ${job.id}: an identical revision exists (${job.revisionId}); nothing recomputed` : `started job ${job.id} (${args.kind})`);

    if (args.wait) {
      let last = '';
      while (!['succeeded', 'failed', 'cancelled'].includes(job.state)) {
        await new Promise((r) => setTimeout(r, args.pollMs));
        job = (await call('GET', `/projects/${projectId}/jobs/${job.id}`)).json.job as JobView;
        const line = describeProgress(job);
        if (line !== last) console.error(line);
        last = line;
      }
    }

    let file: string | null = null;
    if (job.state === 'succeeded' && args.out && job.revisionId !== null) {
      const name = args.kind === 'mesh' ? 'mesh.vtu' : 'results.json';
      const bytes = await download(args, `/projects/${projectId}/revisions/${job.revisionId}/files/${name}`, args.out);
      file = args.out;
      console.error(`wrote ${args.out} (${name}, ${bytes} bytes)`);
    }
    console.log(JSON.stringify({ projectId, designId, designVersion, jobId: job.id, state: job.state, revisionId: job.revisionId, reused: job.reused ?? false, file }));
    if (job.state === 'failed') {
      console.error(`job ${job.id} failed: ${job.error ?? 'no reason given'}`);
      return 1;
    }
    if (job.state === 'cancelled') {
      console.error(`job ${job.id} was cancelled`);
      return 1;
    }
    return 0;
  } catch (e) {
    if (e instanceof RemoteError) {
      console.error(e.message);
      return 1;
    }
    throw e;
  }
}
