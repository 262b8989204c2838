/**
 * Jobs and revisions (contract: server/contracts/api.ts, sections "jobs" and "revisions").
 *
 *   POST /projects/:projectId/designs/:designId/jobs               mesh.create   202 { job }, or 200 { job } reused
 *   GET  /projects/:projectId/jobs                                 project.read  { jobs } recent first
 *   GET  /projects/:projectId/jobs/:jobId                          project.read  { job }
 *   GET  /projects/:projectId/jobs/:jobId/events                   project.read  text/event-stream of { job }
 *   POST /projects/:projectId/jobs/:jobId/cancel                   mesh.create   { job }
 *   GET  /projects/:projectId/revisions[?designId=]                project.read  { revisions } recent first
 *   GET  /projects/:projectId/revisions/:revisionId                project.read  { revision }
 *   GET  /projects/:projectId/revisions/:revisionId/files/:name    project.read  the file, streamed
 *
 * The event stream sends the job (event `job`) at once and again on every change, and ends after
 * the job has finished (succeeded, failed or cancelled). It reads the jobs row, so it follows a job
 * whichever process runs it.
 */
import type { Response } from 'express';
import { designParamsSchema, jobCreateBodySchema, jobParamsSchema, revisionFileParamsSchema, revisionListQuerySchema, revisionParamsSchema, type Job } from '@contracts/api';
import { parseOr422 } from '../services/errors';
import { currentUser, deferredAccess } from '../http/access';
import type { RouteModule } from './context';

/**
 * The two lists above as request paths (exact, lower case, no trailing slash): served without express-session and
 * passport (server/http/sessionStore.ts `sessionFreeReads`, mounted in app.ts). Other spellings Express would also
 * route here simply take the usual path.
 */
export const SESSION_FREE_READS = /^\/api\/projects\/[^/]+\/(?:jobs|revisions)$/;

/** how often the event stream looks at the job row (ms) */
export const EVENTS_POLL_MS = 300;
/** a comment line this often keeps proxies from closing a quiet stream (common practice) */
const HEARTBEAT_MS = 15_000;

const finished = (j: Job) => j.state === 'succeeded' || j.state === 'failed' || j.state === 'cancelled';

function write(res: Response, text: string | Uint8Array): Promise<void> {
  return new Promise((resolve) => {
    if (res.write(text)) resolve();
    else res.once('drain', resolve);
  });
}

export const jobRoutes: RouteModule = (router, { services, access, logger }) => {
  router.post('/projects/:projectId/designs/:designId/jobs', access.requireCapability('mesh.create'), async (req, res) => {
    const { projectId, designId } = parseOr422(designParamsSchema, req.params, 'address');
    const body = parseOr422(jobCreateBodySchema, req.body, 'job request');
    const { job, reused } = await services.jobs.create(projectId, designId, body, currentUser(req).id);
    res.status(reused ? 200 : 202).json({ job });
  });

  // the two lists the studio polls: the role is read in the list's own statement, and the service checks it
  router.get('/projects/:projectId/jobs', access.checkCapabilityInService('project.read'), async (_req, res) => {
    const { projectId, userId, capability } = deferredAccess(res);
    res.json({ jobs: await services.jobs.list(projectId, userId, capability) });
  });

  router.get('/projects/:projectId/jobs/:jobId', access.requireCapability('project.read'), async (req, res) => {
    const { projectId, jobId } = parseOr422(jobParamsSchema, req.params, 'address');
    res.json({ job: await services.jobs.get(projectId, jobId) });
  });

  router.get('/projects/:projectId/jobs/:jobId/events', access.requireCapability('project.read'), async (req, res) => {
    const { projectId, jobId } = parseOr422(jobParamsSchema, req.params, 'address');
    let job = await services.jobs.get(projectId, jobId); // a 404 before the stream starts
    res.status(200);
    res.setHeader('Content-Type', 'text/event-stream; charset=utf-8');
    res.setHeader('Cache-Control', 'no-cache, no-transform');
    res.setHeader('X-Accel-Buffering', 'no');
    res.flushHeaders();
    let closed = false;
    req.on('close', () => {
      closed = true;
    });
    let last = '';
    let lastBeat = Date.now();
    try {
      for (;;) {
        const text = JSON.stringify({ job });
        if (text !== last) {
          last = text;
          await write(res, `event: job\nid: ${Date.now()}\ndata: ${text}\n\n`);
          lastBeat = Date.now();
        }
        if (finished(job) || closed) break;
        if (Date.now() - lastBeat > HEARTBEAT_MS) {
          await write(res, ': still here\n\n');
          lastBeat = Date.now();
        }
        await new Promise((r) => setTimeout(r, EVENTS_POLL_MS));
        if (closed) break;
        job = await services.jobs.get(projectId, jobId);
      }
    } catch (e) {
      // the job went away (its design was deleted) or the database failed: say so and end the stream
      logger.warn(`job ${jobId} events:`, e instanceof Error ? e.message : e);
      if (!closed) await write(res, `event: gone\ndata: ${JSON.stringify({ message: e instanceof Error ? e.message : 'The job can no longer be read.' })}\n\n`);
    }
    res.end();
  });

  router.post('/projects/:projectId/jobs/:jobId/cancel', access.requireCapability('mesh.create'), async (req, res) => {
    const { projectId, jobId } = parseOr422(jobParamsSchema, req.params, 'address');
    res.json({ job: await services.jobs.cancel(projectId, jobId, currentUser(req).id) });
  });

  router.get('/projects/:projectId/revisions', access.checkCapabilityInService('project.read'), async (req, res) => {
    const { projectId, userId, capability } = deferredAccess(res);
    const query = revisionListQuerySchema.safeParse(req.query);
    if (!query.success) {
      // a bad query: the role answers first (404 / 403 before 422), as on every other project route; then the 422
      await services.projects.authorize(projectId, userId, capability);
      parseOr422(revisionListQuerySchema, req.query, 'query');
    }
    res.json({ revisions: await services.jobs.listRevisions(projectId, userId, capability, query.data?.designId) });
  });

  router.get('/projects/:projectId/revisions/:revisionId', access.requireCapability('project.read'), async (req, res) => {
    const { projectId, revisionId } = parseOr422(revisionParamsSchema, req.params, 'address');
    res.json({ revision: await services.jobs.getRevision(projectId, revisionId) });
  });

  router.get('/projects/:projectId/revisions/:revisionId/files/:name', access.requireCapability('project.read'), async (req, res) => {
    const { projectId, revisionId, name } = parseOr422(revisionFileParamsSchema, req.params, 'address');
    const dl = await services.jobs.download(projectId, revisionId, name, currentUser(req).id);
    res.status(200);
    res.setHeader('Content-Type', dl.file.contentType);
    res.setHeader('Content-Length', String(dl.file.bytes));
    res.setHeader('Content-Disposition', `attachment; filename="${dl.fileName}"`);
    res.setHeader('Cache-Control', 'private, max-age=3600, immutable');
    let closed = false;
    req.on('close', () => {
      closed = true;
    });
    try {
      for await (const piece of dl.pieces()) {
        if (closed) break;
        await write(res, piece);
      }
      res.end();
    } catch (e) {
      // headers are gone: the only honest signal left is a cut connection (Content-Length is not met)
      logger.error(`revision ${revisionId} ${name}: download broke off:`, e);
      res.destroy();
    }
  });
};
