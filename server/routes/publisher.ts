// Publisher routes under /api/publisher: listings, uploads (new versions), version pages, facts browser, publishing.
// Every route needs the publisher role (admins pass too and see all listings); other publishers' items answer 404.
import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import { Router, type NextFunction, type Request, type Response } from 'express';
import type { AppContext } from '../context.js';
import { requireRole } from '../auth/guards.js';
import { badRequest, HttpError } from '../http/errors.js';
import { parseBody } from '../http/validate.js';
import { factQuerySchema, listingCreateSchema, listingUpdateSchema, processingModeSchema, rerunSchema } from '../../shared/listings.js';
import { InvalidCursorError, lookupFacts } from '../services/factStore.js';
import { createListing, deleteListing, getOwnedListing, listMyListings, updateListing, type Actor } from '../services/listings.js';
import { publishVersion, unpublishListing } from '../services/publishing.js';
import { multerErrorToHttp, removeVersionFiles, versionUpload, type StoredUpload } from '../services/uploads.js';
import { cancelVersion, createVersion, deleteVersion, getOwnedVersion, listFiles, listVersions, readLog, rerunVersion, toVersionSummary, versionDetail } from '../services/versions.js';

type Handler = (req: Request, res: Response) => Promise<void>;
const wrap = (handler: Handler) => (req: Request, res: Response, next: NextFunction) => void handler(req, res).catch(next);
const actorOf = (req: Request): Actor => ({ id: req.user!.id, roles: req.user!.roles });
const param = (req: Request, name: string) => String(req.params[name] ?? '');

/** The notice box: the publisher confirms the right to publish and that no personal data is included without a lawful basis. */
const NOTICE_ACCEPTED = new Set(['true', 'on', 'yes', '1']);

export function publisherRouter(ctx: AppContext): Router {
  const router = Router();
  router.use(requireRole('publisher', 'admin'));
  const upload = versionUpload(ctx);

  router.get('/listings', wrap(async (req, res) => {
    res.json({ listings: await listMyListings(ctx, actorOf(req)) });
  }));

  router.post('/listings', wrap(async (req, res) => {
    const input = parseBody(listingCreateSchema, req.body, 'listing');
    res.status(201).json({ listing: await createListing(ctx, actorOf(req), input) });
  }));

  router.get('/listings/:id', wrap(async (req, res) => {
    const listing = await getOwnedListing(ctx, actorOf(req), param(req, 'id'));
    const { publisherId: _p, ...rest } = listing;
    res.json({ listing: rest, versions: await listVersions(ctx, listing.id) });
  }));

  router.patch('/listings/:id', wrap(async (req, res) => {
    const input = parseBody(listingUpdateSchema, req.body, 'listing');
    res.json({ listing: await updateListing(ctx, actorOf(req), param(req, 'id'), input) });
  }));

  router.delete('/listings/:id', wrap(async (req, res) => {
    await deleteListing(ctx, actorOf(req), param(req, 'id'));
    res.status(204).end();
  }));

  router.post('/listings/:id/unpublish', wrap(async (req, res) => {
    const listing = await getOwnedListing(ctx, actorOf(req), param(req, 'id'));
    await unpublishListing(ctx, listing.id);
    res.json({ listing: (({ publisherId: _p, ...rest }) => rest)(await getOwnedListing(ctx, actorOf(req), listing.id)) });
  }));

  // A new version: ownership is checked before a byte is written; the version id is fixed first so files land in its folder.
  router.post(
    '/listings/:id/versions',
    wrap(async (req, res) => {
      const listing = await getOwnedListing(ctx, actorOf(req), param(req, 'id'));
      const versionId = randomUUID();
      req.uploadTarget = { listingId: listing.id, versionId, position: 0 };
      try {
        await new Promise<void>((resolve, reject) => upload(req, res, (error?: unknown) => (error ? reject(multerErrorToHttp(error)) : resolve())));
        const files = collectFiles(req);
        const body = (req.body ?? {}) as Record<string, string>;
        if (!NOTICE_ACCEPTED.has(String(body.notice ?? '').toLowerCase())) {
          throw badRequest('Confirm the notice: you have the right to publish these files and they hold no personal data without a lawful basis.', { notice: ['Tick the box to confirm.'] });
        }
        const mode = processingModeSchema.safeParse(body.mode ?? 'strict');
        if (!mode.success) throw badRequest('mode must be "strict" or "approximate".', { mode: ['Choose strict or approximate.'] });
        let csvMappings: Record<string, unknown> = {};
        if (body.csvMappings) {
          try {
            csvMappings = JSON.parse(body.csvMappings) as Record<string, unknown>;
          } catch {
            throw badRequest('csvMappings is not valid JSON.', { csvMappings: ['Send a JSON object: file name → column mapping.'] });
          }
          if (typeof csvMappings !== 'object' || csvMappings === null || Array.isArray(csvMappings)) throw badRequest('csvMappings must be a JSON object keyed by file name.', { csvMappings: ['Send a JSON object: file name → column mapping.'] });
        }
        const version = await createVersion(ctx, listing.id, versionId, files, { mode: mode.data, csvMappings });
        res.status(201).json({ version });
      } catch (error) {
        // Nothing of a refused upload stays on disk.
        await removeVersionFiles(ctx, listing.id, versionId);
        throw error;
      }
    }),
  );

  router.get('/versions/:id', wrap(async (req, res) => {
    const row = await getOwnedVersion(ctx, actorOf(req), param(req, 'id'));
    res.json({ version: await versionDetail(ctx, row), log: await readLog(ctx, row.id) });
  }));

  // Light endpoint for the live progress poll: status, stage, progress and the log lines after `after`.
  router.get('/versions/:id/status', wrap(async (req, res) => {
    const row = await getOwnedVersion(ctx, actorOf(req), param(req, 'id'));
    const after = Number(req.query.after ?? 0);
    res.json({ version: toVersionSummary(row), log: await readLog(ctx, row.id, Number.isFinite(after) ? after : 0) });
  }));

  router.get('/versions/:id/program', wrap(async (req, res) => {
    const row = await getOwnedVersion(ctx, actorOf(req), param(req, 'id'));
    if (!row.program) throw new HttpError(404, 'This version has no rule program (it did not get past the rewriting).');
    res.type('text/plain; charset=utf-8');
    if (req.query.download !== undefined) res.attachment(`${row.slug}-v${row.number}-rules.txt`);
    res.send(row.program);
  }));

  router.get('/versions/:id/facts', wrap(async (req, res) => {
    const row = await getOwnedVersion(ctx, actorOf(req), param(req, 'id'));
    if (row.status !== 'ready') throw new HttpError(409, `Version ${row.number} is ${row.status}; facts can be browsed once it is ready.`, 'not_ready');
    const q = parseBody(factQuerySchema, req.query, 'filter');
    try {
      const page = await lookupFacts(ctx.pool, row.store_key, { subject: q.subject, predicate: q.predicate, object: q.object }, { limit: q.limit, cursor: q.cursor });
      res.json(page);
    } catch (error) {
      if (error instanceof InvalidCursorError) throw badRequest(error.message, { cursor: [error.message] });
      throw error;
    }
  }));

  router.get('/versions/:id/files/:fileId', wrap(async (req, res) => {
    const row = await getOwnedVersion(ctx, actorOf(req), param(req, 'id'));
    const file = (await listFiles(ctx.pool, row.id)).find((f) => f.id === param(req, 'fileId'));
    if (!file || !fs.existsSync(file.storedPath)) throw new HttpError(404, 'No such file in this version.');
    // The upload folder sits under .data/, which send() would otherwise treat as a hidden path.
    res.download(file.storedPath, file.originalName, { dotfiles: 'allow' });
  }));

  router.post('/versions/:id/cancel', wrap(async (req, res) => {
    const row = await getOwnedVersion(ctx, actorOf(req), param(req, 'id'));
    res.json({ version: await cancelVersion(ctx, row) });
  }));

  router.post('/versions/:id/publish', wrap(async (req, res) => {
    const row = await getOwnedVersion(ctx, actorOf(req), param(req, 'id'));
    await publishVersion(ctx, row);
    res.json({ version: toVersionSummary((await getOwnedVersion(ctx, actorOf(req), row.id))) });
  }));

  router.post('/versions/:id/rerun', wrap(async (req, res) => {
    const row = await getOwnedVersion(ctx, actorOf(req), param(req, 'id'));
    const { mode } = parseBody(rerunSchema, req.body, 'request');
    res.status(201).json({ version: await rerunVersion(ctx, row, mode) });
  }));

  router.delete('/versions/:id', wrap(async (req, res) => {
    const row = await getOwnedVersion(ctx, actorOf(req), param(req, 'id'));
    await deleteVersion(ctx, row);
    res.status(204).end();
  }));

  return router;
}

function collectFiles(req: Request): StoredUpload[] {
  const byField = (req.files ?? {}) as Record<string, (Express.Multer.File & StoredUpload)[]>;
  return [...(byField.ontology ?? []), ...(byField.datasets ?? [])].map((f) => ({
    role: f.role, originalName: f.originalName, storedPath: f.storedPath, format: f.format, sizeBytes: f.sizeBytes, sha256: f.sha256, csvHeader: f.csvHeader,
  }));
}
