/**
 * JSON request bodies, sized per route (issue 8, item 7):
 *
 *   design bodies: POST /api/projects/:id/designs and PUT /api/projects/:id/designs/:designId
 *     up to `designLimit` (40 MB by default: a 100,000-site document with every optional field is ~17 MB, see
 *     tests/bench/load.bench.ts); above `offThreadBytes` the body stays a raw Buffer for the off-thread reader
 *     (server/http/designBody.ts)
 *   every other route
 *     up to min(designLimit, 1 MB): no other field takes more than a few kilobytes, so a larger body is refused
 *     with 413 before parsing
 */
import express, { type Request, type RequestHandler } from 'express';

/** "40mb", "64kb", "512b" or a number of bytes (body-parser's units, 1 kb = 1024 b). */
export function parseByteSize(size: string | number): number {
  if (typeof size === 'number') return size;
  const m = /^\s*(\d+(?:\.\d+)?)\s*(b|kb|mb|gb)?\s*$/i.exec(size);
  if (!m) throw new Error(`not a byte size: ${size}`);
  const unit = { b: 1, kb: 1024, mb: 1024 ** 2, gb: 1024 ** 3 }[(m[2] ?? 'b').toLowerCase() as 'b' | 'kb' | 'mb' | 'gb'];
  return Math.floor(Number(m[1]) * unit);
}

export const OTHER_BODY_LIMIT_BYTES = 1024 * 1024;

/** Routes that take whole design documents: create (POST …/designs) and save (PUT …/designs/:designId). */
export function isDesignBodyRoute(req: Request): boolean {
  if (req.method === 'POST') return /^\/api\/projects\/[^/]+\/designs\/?$/.test(req.path);
  if (req.method === 'PUT') return /^\/api\/projects\/[^/]+\/designs\/[^/]+\/?$/.test(req.path);
  return false;
}

function isJson(req: Request): boolean {
  return /^application\/json\s*(;|$)/i.test(String(req.headers['content-type'] ?? ''));
}

declare module 'express-serve-static-core' {
  interface Request {
    /**
     * A large design body left unread for the off-thread reader, which streams it into its worker thread piece by
     * piece (server/http/designBody.ts): `limit` is the largest body it may take.
     */
    designBodyStream?: { limit: number };
  }
}

/** a body sent as it is (no Content-Encoding, or identity): the only kind streamed to the worker unread */
function isIdentity(req: Request): boolean {
  const enc = String(req.headers['content-encoding'] ?? 'identity').trim().toLowerCase();
  return enc === 'identity' || enc === '';
}

export function jsonBodies(opts: { designLimit: number; offThreadBytes: number }): RequestHandler[] {
  const otherLimit = Math.min(opts.designLimit, OTHER_BODY_LIMIT_BYTES);
  const large = (req: Request) => {
    if (!isDesignBodyRoute(req) || !isJson(req)) return false;
    const len = Number(req.headers['content-length']);
    // a chunked body has no length: treat it as large (its size is only known once read)
    return !Number.isFinite(len) || len > opts.offThreadBytes;
  };
  // A large body sent as it is stays unread here: joining 17 MB into one Buffer on the request thread (raw-body's
  // Buffer.concat: a fresh allocation, page faults and a copy) held the event loop for up to 200 ms on a loaded
  // machine. One declared above the limit is refused at once, as raw-body does (413 before reading).
  const streamed: RequestHandler = (req, _res, next) => {
    if (!large(req) || !isIdentity(req)) return next();
    const len = Number(req.headers['content-length']);
    if (Number.isFinite(len) && len > opts.designLimit) {
      return next(Object.assign(new Error('request entity too large'), { status: 413, type: 'entity.too.large' }));
    }
    req.designBodyStream = { limit: opts.designLimit };
    next();
  };
  // an encoded (gzip, deflate) large body: read whole and inflated by body-parser, then handed over as one Buffer
  const raw = express.raw({ type: (req) => large(req as Request) && !(req as Request).designBodyStream, limit: opts.designLimit });
  const designJson = express.json({ limit: opts.designLimit });
  const otherJson = express.json({ limit: otherLimit });
  return [
    streamed,
    raw,
    (req, res, next) => (req.designBodyStream ? next() : (isDesignBodyRoute(req) ? designJson : otherJson)(req, res, next)),
  ];
}
