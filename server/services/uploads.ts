// Uploads of ontology and dataset files: a multer storage engine that streams to disk with per-role size limits,
// computes sha256 on the way and checks the file's type by extension and by a sniff of its first bytes.
import { createHash, randomUUID } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import type { Request } from 'express';
import multer, { type StorageEngine } from 'multer';
import type { AppContext } from '../context.js';
import { HttpError } from '../http/errors.js';
import { UPLOAD_LIMITS } from '../../shared/listings.js';
import type { DatasetFormat, OntologyFormat } from '../../reasoner/api.js';

export type UploadRole = 'ontology' | 'dataset';
export type StoredFormat = OntologyFormat | DatasetFormat;

/** What the storage engine adds to each multer file. */
export interface StoredUpload {
  role: UploadRole;
  originalName: string;
  storedPath: string;
  format: StoredFormat;
  sizeBytes: number;
  sha256: string;
  /** The first line of a CSV file (its header), for checking the column mapping. */
  csvHeader?: string[];
}

const SNIFF_BYTES = 8192;

export const ROLE_OF_FIELD: Record<string, UploadRole> = { ontology: 'ontology', datasets: 'dataset' };

/** Upload directory of one version: <uploadDir>/<listing>/<version>/. */
export function versionDir(ctx: AppContext, listingId: string, versionId: string): string {
  return path.resolve(ctx.config.uploadDir, listingId, versionId);
}

export async function removeVersionFiles(ctx: AppContext, listingId: string, versionId: string): Promise<void> {
  await fs.promises.rm(versionDir(ctx, listingId, versionId), { recursive: true, force: true });
}
export async function removeListingFiles(ctx: AppContext, listingId: string): Promise<void> {
  await fs.promises.rm(path.resolve(ctx.config.uploadDir, listingId), { recursive: true, force: true });
}

function extensionOf(name: string): string {
  const match = /\.([A-Za-z0-9]+)$/.exec(name);
  return match ? match[1]!.toLowerCase() : '';
}

const unsupported = (message: string) => new HttpError(415, message, 'unsupported_media_type');

/** Strips a UTF-8 byte-order mark, leading blank lines and `#` comment lines, which every accepted text format allows. */
function firstContent(head: string): string {
  return head.replace(/^\uFEFF/, '').replace(/^(?:\s*(?:#[^\n]*)?\n)*\s*/, '');
}

/**
 * Decides the format from the extension and the first bytes; throws 415 naming the file and what was expected.
 * Sniffs (from the formats' grammars): OWL 2 Functional-Style Syntax opens with `Prefix(` or `Ontology(` (OWL 2 Structural
 * Specification §3.7); N-Triples lines open with an IRI `<…>` or a blank node `_:` (RDF 1.1 N-Triples §2); Turtle opens
 * with a directive, an IRI, a blank node, a collection or a prefixed name (RDF 1.1 Turtle §2); RDF/XML is XML (`<?xml`, `<rdf:RDF`).
 */
export function sniffFormat(role: UploadRole, originalName: string, head: Buffer): StoredFormat {
  const ext = extensionOf(originalName);
  const allowed: readonly string[] = role === 'ontology' ? UPLOAD_LIMITS.ontologyExtensions : UPLOAD_LIMITS.datasetExtensions;
  if (!allowed.includes(ext)) {
    throw unsupported(`${originalName}: ${role === "ontology" ? "an ontology" : "a dataset"} file must end in ${allowed.map((e) => '.' + e).join(', ')}${ext ? ` (got .${ext})` : ''}.`);
  }
  if (head.length === 0) throw new HttpError(400, `${originalName} is empty.`, 'empty_file');
  if (head.includes(0)) throw unsupported(`${originalName} is not a text file (it contains NUL bytes); upload the ${ext} text itself, not an archive.`);
  const text = firstContent(head.toString('utf8'));
  const isXml = /^<(\?xml|rdf:RDF|!DOCTYPE)/.test(text);
  const isOfn = /^(Prefix|Ontology)\s*\(/.test(text);
  const isNt = /^(<[^>\s]*>|_:)/.test(text);
  const isTurtle = isNt || /^(@prefix|@base|PREFIX\b|BASE\b|\[|\(|[A-Za-z][\w.-]*:|:)/i.test(text);
  switch (ext) {
    case 'ofn':
      if (isOfn) return 'ofn';
      throw unsupported(`${originalName} does not look like OWL functional-style syntax: it should open with Prefix(…) or Ontology(…).`);
    case 'owl':
    case 'rdf':
      if (isXml) return 'rdfxml';
      if (isOfn) return 'ofn';
      throw unsupported(`${originalName} is neither RDF/XML (an XML document) nor OWL functional-style syntax (opening with Prefix( or Ontology().`);
    case 'nt':
      if (isNt || text === '') return 'ntriples';
      throw unsupported(`${originalName} does not look like N-Triples: each line should start with <IRI> or _:blank.`);
    case 'ttl':
      if (isTurtle || text === '') return 'turtle';
      throw unsupported(`${originalName} does not look like Turtle: it should open with @prefix, PREFIX, an <IRI> or a prefixed name.`);
    case 'csv': {
      const header = text.split(/\r?\n/, 1)[0] ?? '';
      if (!header.includes(',') && header.trim().length === 0) throw unsupported(`${originalName} has no header line.`);
      return 'csv';
    }
  }
  throw unsupported(`${originalName}: unsupported type.`);
}

/** Splits a CSV header line (RFC 4180 §2: fields separated by commas, optionally in double quotes). */
export function csvHeader(head: Buffer): string[] {
  const line = firstContent(head.toString('utf8')).split(/\r?\n/, 1)[0] ?? '';
  const cells: string[] = [];
  let cell = '', quoted = false;
  for (let i = 0; i < line.length; i++) {
    const c = line[i]!;
    if (quoted) {
      if (c === '"' && line[i + 1] === '"') (cell += '"'), i++;
      else if (c === '"') quoted = false;
      else cell += c;
    } else if (c === '"') quoted = true;
    else if (c === ',') cells.push(cell.trim()), (cell = '');
    else cell += c;
  }
  cells.push(cell.trim());
  return cells;
}

declare module 'express-serve-static-core' {
  interface Request {
    /** Set before multer runs: where this request's files go. */
    uploadTarget?: { listingId: string; versionId: string; position: number };
  }
}

/** Streams one file to disk: counts bytes against the role's limit, hashes, sniffs the first bytes. */
class VersionStorage implements StorageEngine {
  constructor(private readonly ctx: AppContext) {}

  _handleFile(req: Request, file: Express.Multer.File, callback: (error?: unknown, info?: Partial<Express.Multer.File> & StoredUpload) => void): void {
    const target = req.uploadTarget;
    const role = ROLE_OF_FIELD[file.fieldname];
    if (!target || !role) return callback(new HttpError(400, `Unexpected file field "${file.fieldname}": send the ontology as "ontology" and datasets as "datasets".`, 'unexpected_field'));
    const originalName = decodeName(file.originalname);
    const limit = role === 'ontology' ? UPLOAD_LIMITS.ontologyBytes : UPLOAD_LIMITS.datasetBytes;
    const dir = versionDir(this.ctx, target.listingId, target.versionId);
    const position = target.position++;
    const ext = extensionOf(originalName) || 'bin';
    const storedPath = path.join(dir, `${String(position).padStart(2, '0')}-${role}-${randomUUID().slice(0, 8)}.${ext}`);
    fs.mkdirSync(dir, { recursive: true });
    const out = fs.createWriteStream(storedPath, { flags: 'wx' });
    const hash = createHash('sha256');
    let size = 0;
    let head = Buffer.alloc(0);
    let format: StoredFormat | null = null;
    let failed = false;
    const fail = (error: unknown) => {
      if (failed) return;
      failed = true;
      file.stream.unpipe();
      file.stream.resume(); // drain the rest so busboy can finish the request
      out.destroy();
      fs.rm(storedPath, { force: true }, () => callback(error));
    };
    file.stream.on('data', (chunk: Buffer) => {
      if (failed) return;
      size += chunk.length;
      if (size > limit) {
        return fail(new HttpError(413, `${originalName} is larger than the ${role} limit of ${limit / 1024 / 1024} MB.`, 'payload_too_large'));
      }
      hash.update(chunk);
      if (format === null) {
        head = Buffer.concat([head, chunk]);
        if (head.length >= SNIFF_BYTES) {
          try {
            format = sniffFormat(role, originalName, head.subarray(0, SNIFF_BYTES));
          } catch (error) {
            return fail(error);
          }
        }
      }
      if (!out.write(chunk)) {
        file.stream.pause();
        out.once('drain', () => file.stream.resume());
      }
    });
    file.stream.on('error', fail);
    out.on('error', fail);
    file.stream.on('end', () => {
      if (failed) return;
      try {
        format ??= sniffFormat(role, originalName, head);
      } catch (error) {
        return fail(error);
      }
      out.end(() => {
        if (failed) return;
        callback(null, {
          role,
          originalName,
          storedPath,
          format: format!,
          sizeBytes: size,
          sha256: hash.digest('hex'),
          csvHeader: format === 'csv' ? csvHeader(head.subarray(0, SNIFF_BYTES)) : undefined,
          size,
          path: storedPath,
        });
      });
    });
  }

  _removeFile(_req: Request, file: Express.Multer.File & Partial<StoredUpload>, callback: (error: Error | null) => void): void {
    fs.rm(file.storedPath ?? file.path, { force: true }, () => callback(null));
  }
}

/** Browsers send UTF-8 file names; busboy reads the header as latin1 unless told otherwise. */
function decodeName(name: string): string {
  const bytes = Buffer.from(name, 'latin1');
  const utf8 = bytes.toString('utf8');
  const clean = /\uFFFD/.test(utf8) ? name : utf8;
  return path.basename(clean).slice(0, 200) || 'upload';
}

/** The multer middleware for a version upload: one ontology, up to ten datasets, small text fields. */
export function versionUpload(ctx: AppContext) {
  return multer({
    storage: new VersionStorage(ctx),
    limits: { fileSize: UPLOAD_LIMITS.datasetBytes, files: 1 + UPLOAD_LIMITS.maxDatasets, fields: 10, fieldSize: 256 * 1024, parts: 30 },
  }).fields([
    { name: 'ontology', maxCount: 1 },
    { name: 'datasets', maxCount: UPLOAD_LIMITS.maxDatasets },
  ]);
}

/** Maps multer's own errors to the JSON error shape with a message naming the limit. */
export function multerErrorToHttp(error: unknown): unknown {
  if (!(error instanceof multer.MulterError)) return error;
  switch (error.code) {
    case 'LIMIT_FILE_SIZE':
      return new HttpError(413, `${error.field ?? 'A file'} is larger than ${UPLOAD_LIMITS.datasetBytes / 1024 / 1024} MB.`, 'payload_too_large');
    case 'LIMIT_FILE_COUNT':
    case 'LIMIT_UNEXPECTED_FILE':
      return new HttpError(400, `Send exactly one file as "ontology" and at most ${UPLOAD_LIMITS.maxDatasets} as "datasets"${error.field ? ` (unexpected "${error.field}")` : ''}.`, 'too_many_files');
    default:
      return new HttpError(400, `The upload could not be read: ${error.message}.`, 'bad_upload');
  }
}

/** Stores a file from the local disk as an upload (seed, benchmarks): same checks, hash and layout as a browser upload. */
export async function storeLocalFile(ctx: AppContext, target: { listingId: string; versionId: string; position: number }, role: UploadRole, sourcePath: string, originalName = path.basename(sourcePath)): Promise<StoredUpload> {
  const head = Buffer.alloc(SNIFF_BYTES);
  const fd = await fs.promises.open(sourcePath, 'r');
  const { bytesRead } = await fd.read(head, 0, SNIFF_BYTES, 0);
  await fd.close();
  const format = sniffFormat(role, originalName, head.subarray(0, bytesRead));
  const dir = versionDir(ctx, target.listingId, target.versionId);
  await fs.promises.mkdir(dir, { recursive: true });
  const position = target.position++;
  const storedPath = path.join(dir, `${String(position).padStart(2, '0')}-${role}-${randomUUID().slice(0, 8)}.${extensionOf(originalName) || 'bin'}`);
  const hash = createHash('sha256');
  let size = 0;
  await new Promise<void>((resolve, reject) => {
    const input = fs.createReadStream(sourcePath);
    const output = fs.createWriteStream(storedPath, { flags: 'wx' });
    input.on('data', (chunk) => {
      hash.update(chunk as Buffer);
      size += (chunk as Buffer).length;
    });
    input.on('error', reject);
    output.on('error', reject);
    output.on('finish', () => resolve());
    input.pipe(output);
  });
  return { role, originalName, storedPath, format, sizeBytes: size, sha256: hash.digest('hex'), csvHeader: format === 'csv' ? csvHeader(head.subarray(0, bytesRead)) : undefined };
}
