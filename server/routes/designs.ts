/**
 * The designs of a project (contract: server/contracts/api.ts, section "designs").
 *
 *   GET    /projects/:projectId/designs                              project.read
 *   POST   /projects/:projectId/designs                              design.edit
 *   GET    /projects/:projectId/designs/:designId                    project.read
 *   PUT    /projects/:projectId/designs/:designId                    design.edit
 *   DELETE /projects/:projectId/designs/:designId                    design.edit
 *   GET    /projects/:projectId/designs/:designId/versions           project.read
 *   GET    /projects/:projectId/designs/:designId/versions/:version  project.read
 *   POST   /projects/:projectId/designs/:designId/imports            design.edit (writes nothing; it
 *                                                                    prepares an edit, so viewers get 403)
 *   GET    /projects/:projectId/designs/:designId/export?format=…    project.export
 *
 * Imports are multipart/form-data with one file field `file` (multer, in memory), at most
 * IMPORT_MAX_BYTES: a larger file is refused with 413 before the rest is read.
 */
import type { Request, Response } from 'express';
import multer from 'multer';
import {
  designCreateBodySchema,
  designExportQuerySchema,
  designParamsSchema,
  designUpdateBodySchema,
  designVersionParamsSchema,
} from '@contracts/api';
import { AppError, parseOr422 } from '../services/errors';
import { currentUser, projectAccess } from '../http/access';
import type { RouteModule } from './context';
import { documentText, type DesignMeta } from '../services/designs';

/** Largest uploaded site file: a 100,000-site CSV with long ids is about 8 MB. */
export const IMPORT_MAX_BYTES = 16 * 1024 * 1024;

const upload = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: IMPORT_MAX_BYTES, files: 1, fields: 5, parts: 6, fieldSize: 1024 },
}).single('file');

/** Run multer and turn its errors into our error codes. */
function receiveFile(req: Request, res: Response): Promise<Express.Multer.File> {
  return new Promise((resolve, reject) => {
    upload(req, res, (err: unknown) => {
      if (err instanceof multer.MulterError) {
        if (err.code === 'LIMIT_FILE_SIZE') {
          reject(new AppError('payload_too_large', `The file is larger than ${IMPORT_MAX_BYTES / (1024 * 1024)} MB, the most an import reads. Split it into parts.`));
        } else if (err.code === 'LIMIT_UNEXPECTED_FILE' || err.code === 'LIMIT_FILE_COUNT') {
          reject(new AppError('validation_failed', 'Send exactly one file, in the form field "file".', [{ path: ['file'], message: 'send one file in the field "file"' }]));
        } else {
          reject(new AppError('bad_request', `The upload could not be read (${err.message}).`));
        }
        return;
      }
      if (err) {
        // busboy: a body that is not well-formed multipart
        reject(new AppError('bad_request', 'The upload is not a well-formed multipart/form-data request.'));
        return;
      }
      if (!req.file) {
        reject(new AppError('validation_failed', 'Attach the file to import in the form field "file" (multipart/form-data).', [{ path: ['file'], message: 'is missing' }]));
        return;
      }
      resolve(req.file);
    });
  });
}

/** the largest piece of a design answer handed to the socket at once (see writeInPieces) */
export const ANSWER_PIECE_BYTES = 256 * 1024;

/**
 * Write `bytes` (one buffer or the pieces the design-body process sent) to the answer in pieces of at most
 * ANSWER_PIECE_BYTES, each after the socket has taken the one before ('drain'). One `write` of 17 MB became one
 * writev(2) that the kernel serves as far as the socket buffer allows, copying megabytes and running loopback TCP for
 * the reader inside the call: tens of milliseconds in which the request thread answered nothing else, /api/health
 * included (issue 8, item 7). The total work is the same; the event loop now runs between the pieces. Resolves false
 * when the client went away first.
 */
function writeInPieces(res: Response, bytes: Buffer | readonly Buffer[]): Promise<boolean> {
  const list = Buffer.isBuffer(bytes) ? [bytes] : bytes;
  return new Promise((resolve) => {
    let i = 0;
    let at = 0;
    const done = (ok: boolean) => {
      res.off('drain', next);
      res.off('close', gone);
      resolve(ok);
    };
    const gone = () => done(false);
    function next() {
      while (i < list.length) {
        if (res.destroyed) return done(false);
        const b = list[i];
        const piece = b.subarray(at, Math.min(b.byteLength, at + ANSWER_PIECE_BYTES));
        at += piece.byteLength;
        if (at >= b.byteLength) {
          i += 1;
          at = 0;
        }
        // false: the socket holds more than its high-water mark; go on once it has taken it
        if (piece.byteLength > 0 && !res.write(piece)) return;
      }
      done(true);
    }
    res.on('drain', next);
    res.on('close', gone);
    next();
  });
}

/**
 * `{ design: { …meta, document } }` with the document spliced in as the JSON text it was stored from: a large
 * document is never parsed or stringified on the request thread.
 */
async function sendDesignText(res: Response, status: number, meta: DesignMeta, documentJson: string | Buffer | readonly Buffer[]): Promise<void> {
  const head = `{"design":${JSON.stringify(meta).slice(0, -1)},"document":`;
  if (typeof documentJson === 'string') {
    res.status(status).type('application/json').send(`${head}${documentJson}}}`);
    return;
  }
  // UTF-8 bytes from the off-thread reader: written as they are, without joining them into one string or buffer
  const headBytes = Buffer.from(head, 'utf8');
  res.status(status).type('application/json');
  const length = Buffer.isBuffer(documentJson) ? documentJson.byteLength : documentJson.reduce((n, b) => n + b.byteLength, 0);
  res.setHeader('Content-Length', headBytes.byteLength + length + 2);
  res.write(headBytes);
  if (await writeInPieces(res, documentJson)) res.end('}}');
}

export const designRoutes: RouteModule = (router, { services, access, designBodies }) => {
  const base = '/projects/:projectId/designs';

  router.get(base, access.requireCapability('project.read'), async (_req, res) => {
    res.json({ designs: await services.designs.list(projectAccess(res).projectId) });
  });

  router.post(base, access.requireCapability('design.edit'), async (req, res) => {
    const { projectId } = projectAccess(res);
    const read = await designBodies.read(req, 'create', { projectId, designId: null, userId: currentUser(req).id });
    if (read.stored) {
      await sendDesignText(res, 201, read.stored, read.documentJson);
      return;
    }
    if (read.prepared) {
      await sendDesignText(res, 201, await services.designs.createPrepared(projectId, read.prepared, currentUser(req).id), documentText(read.prepared));
      return;
    }
    // parse with the branch the body means, so field errors carry their paths (a failed union would not)
    const [copyBranch, documentBranch] = designCreateBodySchema.options;
    const isCopy = typeof read.body === 'object' && read.body !== null && 'copyOf' in read.body;
    const body = parseOr422(isCopy ? copyBranch : documentBranch, read.body, 'design form');
    res.status(201).json({ design: await services.designs.create(projectId, body, currentUser(req).id) });
  });

  router.get(`${base}/:designId`, access.requireCapability('project.read'), async (req, res) => {
    const { designId } = parseOr422(designParamsSchema, req.params, 'address');
    res.json({ design: await services.designs.get(projectAccess(res).projectId, designId) });
  });

  router.put(`${base}/:designId`, access.requireCapability('design.edit'), async (req, res) => {
    const { designId } = parseOr422(designParamsSchema, req.params, 'address');
    const { projectId } = projectAccess(res);
    const read = await designBodies.read(req, 'update', { projectId, designId, userId: currentUser(req).id });
    if (read.stored) {
      await sendDesignText(res, 200, read.stored, read.documentJson);
      return;
    }
    if (read.prepared) {
      const meta = await services.designs.updatePrepared(projectId, designId, read.prepared, read.version ?? 0, currentUser(req).id);
      await sendDesignText(res, 200, meta, documentText(read.prepared));
      return;
    }
    const body = parseOr422(designUpdateBodySchema, read.body, 'design');
    res.json({ design: await services.designs.update(projectId, designId, body, currentUser(req).id) });
  });

  router.delete(`${base}/:designId`, access.requireCapability('design.edit'), async (req, res) => {
    const { designId } = parseOr422(designParamsSchema, req.params, 'address');
    await services.designs.remove(projectAccess(res).projectId, designId, currentUser(req).id);
    res.status(204).end();
  });

  router.get(`${base}/:designId/versions`, access.requireCapability('project.read'), async (req, res) => {
    const { designId } = parseOr422(designParamsSchema, req.params, 'address');
    res.json({ versions: await services.designs.versions(projectAccess(res).projectId, designId) });
  });

  router.get(`${base}/:designId/versions/:version`, access.requireCapability('project.read'), async (req, res) => {
    const { designId, version } = parseOr422(designVersionParamsSchema, req.params, 'address');
    res.json({ version: await services.designs.version(projectAccess(res).projectId, designId, version) });
  });

  router.post(`${base}/:designId/imports`, access.requireCapability('design.edit'), async (req, res) => {
    const { designId } = parseOr422(designParamsSchema, req.params, 'address');
    const file = await receiveFile(req, res);
    const bytes = new Uint8Array(file.buffer.buffer, file.buffer.byteOffset, file.buffer.byteLength);
    res.json(await services.designs.importFile(projectAccess(res).projectId, designId, { bytes, name: file.originalname ?? '' }));
  });

  router.get(`${base}/:designId/export`, access.requireCapability('project.export'), async (req, res) => {
    const { designId } = parseOr422(designParamsSchema, req.params, 'address');
    const { format } = parseOr422(designExportQuerySchema, req.query, 'export address');
    const out = await services.designs.exportFile(projectAccess(res).projectId, designId, format);
    res.attachment(out.fileName);
    res.type(out.contentType);
    res.setHeader('Cache-Control', 'no-store');
    res.send(out.body);
  });
};
