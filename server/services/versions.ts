// Knowledge-base versions: creation from an upload (files recorded, job queued), detail and live status, job log,
// cancellation, re-runs and deletion. Every read and write goes through ownership (another publisher's version is 404).
import fs from 'node:fs';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import type pg from 'pg';
import type { AppContext } from '../context.js';
import { badRequest, conflict, notFound } from '../http/errors.js';
import { csvMappingSchema, type KbFileInfo, type LogLine, type VersionDetail, type VersionSummary } from '../../shared/listings.js';
import { fieldErrors } from '../../shared/auth.js';
import { cancelQueuedJob, enqueueProcessing } from '../jobs/queue.js';
import { dropFactTables } from './factStore.js';
import { countEntries, isAdmin, type Actor } from './listings.js';
import { removeVersionFiles, versionDir, type StoredUpload } from './uploads.js';

export interface VersionRow {
  id: string; listing_id: string; number: number; store_key: number; status: VersionSummary['status']; stage: string | null; progress: number;
  mode: 'strict' | 'approximate'; profile: unknown; rewriting: VersionDetail['rewriting']; program: string | null; counts: StoredCounts | null;
  diagnostics: VersionDetail['diagnostics'] | null; explanation: VersionDetail['explanation']; timings: Record<string, number> | null; fact_count: string | null;
  job_id: string | null; attempts: number; cancel_requested: boolean; created_at: Date; started_at: Date | null; finished_at: Date | null; error: string | null;
  publisher_id: string; published_version_id: string | null; slug: string; title: string;
}

/** What processing stores in kb_versions.counts. */
export interface StoredCounts {
  facts: number;
  asserted: number;
  terms: number;
  perClass: Record<string, { asserted: number; entailed: number }>;
  perProperty: Record<string, { asserted: number; entailed: number }>;
}

const SELECT_VERSION = `SELECT v.*, l.publisher_id, l.published_version_id, l.slug, l.title FROM kb_versions v JOIN listings l ON l.id = v.listing_id`;

export async function getOwnedVersion(ctx: AppContext, actor: Actor, versionId: string): Promise<VersionRow> {
  if (!/^[0-9a-f-]{36}$/i.test(versionId)) throw notFound('No such version.');
  const { rows } = await ctx.pool.query<VersionRow>(`${SELECT_VERSION} WHERE v.id = $1`, [versionId]);
  const row = rows[0];
  if (!row || (row.publisher_id !== actor.id && !isAdmin(actor))) throw notFound('No such version.');
  return row;
}

export async function loadVersion(db: pg.Pool | pg.PoolClient, versionId: string): Promise<VersionRow | null> {
  const { rows } = await db.query<VersionRow>(`${SELECT_VERSION} WHERE v.id = $1`, [versionId]);
  return rows[0] ?? null;
}

export function toVersionSummary(row: VersionRow): VersionSummary {
  return {
    id: row.id,
    listingId: row.listing_id,
    number: row.number,
    status: row.status,
    stage: row.stage,
    progress: row.progress,
    mode: row.mode,
    factCount: row.fact_count === null ? null : Number(row.fact_count),
    published: row.published_version_id === row.id,
    createdAt: row.created_at.toISOString(),
    startedAt: row.started_at?.toISOString() ?? null,
    finishedAt: row.finished_at?.toISOString() ?? null,
    error: row.error,
  };
}

export async function listVersions(ctx: AppContext, listingId: string): Promise<VersionSummary[]> {
  const { rows } = await ctx.pool.query<VersionRow>(`${SELECT_VERSION} WHERE v.listing_id = $1 ORDER BY v.number DESC`, [listingId]);
  return rows.map(toVersionSummary);
}

export async function listFiles(db: pg.Pool | pg.PoolClient, versionId: string): Promise<(KbFileInfo & { storedPath: string; csvMapping: unknown })[]> {
  const { rows } = await db.query(`SELECT * FROM kb_files WHERE version_id = $1 ORDER BY role DESC, position`, [versionId]);
  return rows.map((r) => ({ id: r.id, role: r.role, originalName: r.original_name, format: r.format, sizeBytes: Number(r.size_bytes), sha256: r.sha256, storedPath: r.stored_path, csvMapping: r.csv_mapping }));
}

export async function versionDetail(ctx: AppContext, row: VersionRow): Promise<VersionDetail> {
  const files = (await listFiles(ctx.pool, row.id)).map(({ storedPath: _p, csvMapping: _m, ...file }) => file);
  const counts = row.counts;
  return {
    ...toVersionSummary(row),
    listingSlug: row.slug,
    listingTitle: row.title,
    profile: row.profile,
    rewriting: row.rewriting,
    counts: counts ? { facts: counts.facts, asserted: counts.asserted, terms: counts.terms, classes: countEntries(counts.perClass), properties: countEntries(counts.perProperty) } : null,
    diagnostics: row.diagnostics ?? [],
    explanation: row.explanation,
    timings: row.timings,
    files,
    hasProgram: !!row.program,
  };
}

export async function appendLog(db: pg.Pool | pg.PoolClient, versionId: string, message: string, level: 'info' | 'warning' | 'error' = 'info'): Promise<void> {
  await db.query(`INSERT INTO kb_version_log (version_id, level, message) VALUES ($1, $2, $3)`, [versionId, level, message]);
}

export async function readLog(ctx: AppContext, versionId: string, afterId = 0): Promise<LogLine[]> {
  const { rows } = await ctx.pool.query(`SELECT id, at, level, message FROM kb_version_log WHERE version_id = $1 AND id > $2 ORDER BY id LIMIT 500`, [versionId, afterId]);
  return rows.map((r) => ({ id: Number(r.id), at: new Date(r.at).toISOString(), level: r.level, message: r.message }));
}

export interface UploadRequestFields { mode: 'strict' | 'approximate'; csvMappings: Record<string, unknown> }

/** Checks the uploaded set (one ontology, 0–10 datasets, a valid column mapping for every CSV) before anything is recorded. */
export function checkUploadSet(files: StoredUpload[], fields: UploadRequestFields): Map<StoredUpload, unknown> {
  const ontologies = files.filter((f) => f.role === 'ontology');
  if (ontologies.length !== 1) throw badRequest('Upload exactly one ontology file (field "ontology").', { ontology: ['Choose the ontology file.'] });
  const mappings = new Map<StoredUpload, unknown>();
  for (const file of files.filter((f) => f.format === 'csv')) {
    const raw = fields.csvMappings[file.originalName];
    const key = `csvMappings.${file.originalName}`;
    if (raw === undefined) throw badRequest(`${file.originalName} is CSV: send a column mapping for it in "csvMappings".`, { [key]: ['A CSV dataset needs a column mapping (subject column and what each column means).'] });
    const parsed = csvMappingSchema.safeParse(raw);
    if (!parsed.success) {
      const fields = Object.fromEntries(Object.entries(fieldErrors(parsed.error)).map(([k, v]) => [`${key}.${k}`, v]));
      throw badRequest(`The column mapping of ${file.originalName} is not valid.`, fields);
    }
    // Re-runs copy files already checked at upload, so they carry no header.
    const header = file.csvHeader;
    const missing = header ? [parsed.data.subjectColumn, ...Object.keys(parsed.data.columns)].filter((c) => !header.includes(c)) : [];
    if (header && missing.length) throw badRequest(`${file.originalName}: the mapping names columns that are not in its header line (${missing.join(', ')}); the header has ${header.join(', ') || 'no columns'}.`, { [key]: [`Unknown columns: ${missing.join(', ')}`] });
    mappings.set(file, parsed.data);
  }
  return mappings;
}

/** Records a new version with its files and queues it. The version id was chosen before the files were written. */
export async function createVersion(
  ctx: AppContext,
  listingId: string,
  versionId: string,
  files: StoredUpload[],
  fields: UploadRequestFields,
  options: { note?: string; enqueue?: boolean } = {},
): Promise<VersionSummary> {
  const note = options.note ?? 'uploaded';
  const mappings = checkUploadSet(files, fields);
  const client = await ctx.pool.connect();
  try {
    await client.query('BEGIN');
    // The listing row lock serialises version numbering per listing.
    await client.query(`SELECT id FROM listings WHERE id = $1 FOR UPDATE`, [listingId]);
    const { rows } = await client.query<{ n: number }>(`SELECT COALESCE(max(number), 0) + 1 AS n FROM kb_versions WHERE listing_id = $1`, [listingId]);
    await client.query(`INSERT INTO kb_versions (id, listing_id, number, mode, status) VALUES ($1, $2, $3, $4, 'queued')`, [versionId, listingId, rows[0]!.n, fields.mode]);
    for (const [position, file] of files.entries()) {
      await client.query(
        `INSERT INTO kb_files (version_id, role, position, original_name, stored_path, format, size_bytes, sha256, csv_mapping) VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9)`,
        [versionId, file.role, position, file.originalName, file.storedPath, file.format, file.sizeBytes, file.sha256, mappings.has(file) ? JSON.stringify(mappings.get(file)) : null],
      );
    }
    await appendLog(client, versionId, `Version ${rows[0]!.n} ${note}: ${files.length} file(s), ${fields.mode} mode.`);
    await client.query(`UPDATE listings SET updated_at = now() WHERE id = $1`, [listingId]);
    await client.query('COMMIT');
  } catch (error) {
    await client.query('ROLLBACK').catch(() => undefined);
    throw error;
  } finally {
    client.release();
  }
  // The seed processes synchronously (same service, no queue); everything else goes through the queue.
  if (options.enqueue !== false) await enqueueProcessing(ctx, versionId);
  return toVersionSummary((await loadVersion(ctx.pool, versionId))!);
}

/** A new version from an earlier version's files (e.g. again in approximate mode); the files are copied so each version owns its own. */
export async function rerunVersion(ctx: AppContext, row: VersionRow, mode: 'strict' | 'approximate'): Promise<VersionSummary> {
  const files = await listFiles(ctx.pool, row.id);
  const versionId = randomUUID();
  const dir = versionDir(ctx, row.listing_id, versionId);
  await fs.promises.mkdir(dir, { recursive: true });
  const copies: StoredUpload[] = [];
  try {
    for (const file of files) {
      const storedPath = path.join(dir, path.basename(file.storedPath));
      await fs.promises.copyFile(file.storedPath, storedPath);
      copies.push({ role: file.role, originalName: file.originalName, storedPath, format: file.format as StoredUpload['format'], sizeBytes: file.sizeBytes, sha256: file.sha256, csvHeader: undefined });
    }
    const csvMappings = Object.fromEntries(files.filter((f) => f.csvMapping).map((f) => [f.originalName, f.csvMapping]));
    return await createVersion(ctx, row.listing_id, versionId, copies, { mode, csvMappings }, { note: `created from version ${row.number}` });
  } catch (error) {
    await fs.promises.rm(dir, { recursive: true, force: true });
    throw error;
  }
}

/** Cancels: a queued job is withdrawn from the queue; a running one sees the flag at its next poll (within a second). */
export async function cancelVersion(ctx: AppContext, row: VersionRow): Promise<VersionSummary> {
  if (row.status !== 'queued' && row.status !== 'processing') throw conflict(`Version ${row.number} is ${row.status}; only queued or running versions can be cancelled.`);
  await ctx.pool.query(`UPDATE kb_versions SET cancel_requested = true WHERE id = $1`, [row.id]);
  if (row.status === 'queued') {
    if (row.job_id) await cancelQueuedJob(ctx, row.job_id).catch(() => undefined);
    // Only if it did not start meanwhile; a job that did start sees the flag.
    await ctx.pool.query(`UPDATE kb_versions SET status = 'cancelled', stage = NULL, finished_at = now() WHERE id = $1 AND status = 'queued'`, [row.id]);
  }
  await appendLog(ctx.pool, row.id, 'Cancellation requested by the publisher.', 'warning');
  return toVersionSummary((await loadVersion(ctx.pool, row.id))!);
}

/** Deletes a version, its facts and its files. The served version and running versions cannot be deleted. */
export async function deleteVersion(ctx: AppContext, row: VersionRow): Promise<void> {
  if (row.published_version_id === row.id) throw conflict(`Version ${row.number} is the published one; publish another version or unpublish the listing first.`);
  if (row.status === 'queued' || row.status === 'processing') throw conflict(`Version ${row.number} is ${row.status}; cancel it first.`);
  await dropFactTables(ctx.pool, row.store_key);
  await ctx.pool.query(`DELETE FROM kb_versions WHERE id = $1`, [row.id]);
  await removeVersionFiles(ctx, row.listing_id, row.id);
}
