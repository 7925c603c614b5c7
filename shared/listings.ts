// Listing and upload shapes shared by the publisher's forms and the server routes (zod schemas give per-field errors).
import { z } from 'zod';

export const SLUG_PATTERN = /^[a-z0-9](?:[a-z0-9-]{0,62}[a-z0-9])?$/;

const text = (max: number, label: string) => z.string().trim().max(max, `${label}: at most ${max} characters.`);

const tagSchema = z
  .string()
  .trim()
  .toLowerCase()
  .min(1, 'Tags cannot be empty.')
  .max(32, 'Each tag: at most 32 characters.')
  .regex(/^[a-z0-9][a-z0-9 -]*$/, 'Tags: letters, digits, spaces and hyphens.');

/** The listing's fields without defaults: the update schema must not fill in fields the request left out. */
const listingFields = {
  title: text(120, 'Title').min(3, 'Title: at least 3 characters.'),
  slug: z
    .string()
    .trim()
    .toLowerCase()
    .min(3, 'Slug: at least 3 characters.')
    .max(64, 'Slug: at most 64 characters.')
    .regex(SLUG_PATTERN, 'Slug: lower-case letters, digits and inner hyphens only (it becomes part of the API address).'),
  summary: text(280, 'Summary').min(10, 'Summary: at least 10 characters — one sentence on what the knowledge base answers.'),
  descriptionMd: text(20_000, 'Description'),
  tags: z.array(tagSchema).max(12, 'At most 12 tags.'),
  licence: text(120, 'Licence').min(2, 'Licence: name the licence under which subscribers may use the facts.'),
  contact: text(200, 'Contact').min(3, 'Contact: an e-mail address or web page where subscribers reach you.'),
};

export const listingCreateSchema = z.object({ ...listingFields, descriptionMd: listingFields.descriptionMd.default(''), tags: listingFields.tags.default([]) });
export type ListingCreateRequest = z.infer<typeof listingCreateSchema>;

/** Everything but the slug may change (the slug is part of subscribers' API addresses); absent fields stay as they are. */
const { slug: _slug, ...updatable } = listingFields;
export const listingUpdateSchema = z.object(updatable).partial();
export type ListingUpdateRequest = z.infer<typeof listingUpdateSchema>;

/** Upload limits, stated in the upload form and enforced by the server. */
export const UPLOAD_LIMITS = {
  ontologyBytes: 20 * 1024 * 1024,
  datasetBytes: 200 * 1024 * 1024,
  maxDatasets: 10,
  ontologyExtensions: ['ofn', 'ttl', 'nt', 'owl', 'rdf'],
  datasetExtensions: ['nt', 'ttl', 'csv'],
} as const;

export const csvMappingSchema = z.object({
  subjectColumn: z.string().min(1, 'Name the column that holds the subject IRIs.'),
  base: z.string().url('The base must be an absolute IRI.').optional(),
  columns: z.record(
    z.string(),
    z.object({ kind: z.enum(['class', 'property', 'type']), iri: z.string().url('Column IRIs must be absolute.').optional() }),
  ),
});
export type CsvMappingInput = z.infer<typeof csvMappingSchema>;

export const processingModeSchema = z.enum(['strict', 'approximate']);

export const rerunSchema = z.object({ mode: processingModeSchema });

export const factQuerySchema = z.object({
  subject: z.string().min(1).optional(),
  predicate: z.string().min(1).optional(),
  object: z.string().min(1).optional(),
  limit: z.coerce.number().int().min(1).max(500).default(50),
  cursor: z.string().max(200).optional(),
});

export type VersionStatus = 'queued' | 'processing' | 'ready' | 'failed' | 'inconsistent' | 'cancelled';
/** The stages a version goes through; the last one is the bulk load into PostgreSQL. */
export const STAGES = ['parse', 'profile', 'normalise', 'rewrite', 'materialise', 'store'] as const;
export type StageName = (typeof STAGES)[number];

export interface ListingSummary {
  id: string;
  slug: string;
  title: string;
  summary: string;
  tags: string[];
  licence: string;
  contact: string;
  descriptionMd: string;
  publishedVersionId: string | null;
  publishedVersionNumber: number | null;
  latestVersion: { id: string; number: number; status: VersionStatus } | null;
  createdAt: string;
  updatedAt: string;
}

export interface KbFileInfo { id: string; role: 'ontology' | 'dataset'; originalName: string; format: string; sizeBytes: number; sha256: string }

export interface VersionSummary {
  id: string;
  listingId: string;
  number: number;
  status: VersionStatus;
  stage: string | null;
  progress: number;
  mode: 'strict' | 'approximate';
  factCount: number | null;
  published: boolean;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  error: string | null;
}

export interface LogLine { id: number; at: string; level: string; message: string }

export interface PredicateCountEntry { iri: string; asserted: number; entailed: number }

export interface VersionDetail extends VersionSummary {
  listingSlug: string;
  listingTitle: string;
  profile: unknown;
  rewriting: { normalAxioms: number; rules: number; byShape: Record<string, number>; largestBody: number; largestArity: number } | null;
  counts: { facts: number; asserted: number; terms: number; classes: PredicateCountEntry[]; properties: PredicateCountEntry[] } | null;
  diagnostics: { severity: string; position: string; message: string; axiom?: string }[];
  explanation: { facts: string[]; axioms: { position: string; text: string }[] } | null;
  timings: Record<string, number> | null;
  files: KbFileInfo[];
  hasProgram: boolean;
}

export interface CatalogueEntry { slug: string; title: string; summary: string; tags: string[]; publishedVersion: number; factCount: number }

export interface PublicListing extends CatalogueEntry {
  descriptionHtml: string;
  licence: string;
  contact: string;
  /** When the served version finished processing. */
  builtAt: string | null;
  vocabulary: { classes: PredicateCountEntry[]; properties: PredicateCountEntry[] };
  examples: { title: string; command: string }[];
}
