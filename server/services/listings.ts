// Listings: create, read, update and delete for publishers (with ownership), and the public catalogue built from published versions.
import { marked } from 'marked';
import sanitizeHtml from 'sanitize-html';
import type { AppContext } from '../context.js';
import { conflict, notFound } from '../http/errors.js';
import type { CatalogueEntry, ListingCreateRequest, ListingSummary, ListingUpdateRequest, PredicateCountEntry, PublicListing } from '../../shared/listings.js';
import { dropFactTables } from './factStore.js';
import { removeListingFiles } from './uploads.js';

export interface Actor { id: string; roles: readonly string[] }

interface ListingRow {
  id: string; publisher_id: string; slug: string; title: string; summary: string; description_md: string; tags: string[]; licence: string; contact: string;
  published_version_id: string | null; published_number: number | null; latest_id: string | null; latest_number: number | null; latest_status: string | null;
  created_at: Date; updated_at: Date;
}

const SELECT_LISTING = `SELECT l.*, pv.number AS published_number, lv.id AS latest_id, lv.number AS latest_number, lv.status AS latest_status
  FROM listings l
  LEFT JOIN kb_versions pv ON pv.id = l.published_version_id
  LEFT JOIN LATERAL (SELECT id, number, status FROM kb_versions WHERE listing_id = l.id ORDER BY number DESC LIMIT 1) lv ON true`;

function toSummary(row: ListingRow): ListingSummary {
  return {
    id: row.id,
    slug: row.slug,
    title: row.title,
    summary: row.summary,
    tags: row.tags,
    licence: row.licence,
    contact: row.contact,
    descriptionMd: row.description_md,
    publishedVersionId: row.published_version_id,
    publishedVersionNumber: row.published_number,
    latestVersion: row.latest_id ? { id: row.latest_id, number: row.latest_number!, status: row.latest_status as never } : null,
    createdAt: row.created_at.toISOString(),
    updatedAt: row.updated_at.toISOString(),
  };
}

export const isAdmin = (actor: Actor) => actor.roles.includes('admin');

/** The publisher's own listings; an admin sees every listing. */
export async function listMyListings(ctx: AppContext, actor: Actor): Promise<ListingSummary[]> {
  const { rows } = isAdmin(actor)
    ? await ctx.pool.query<ListingRow>(`${SELECT_LISTING} ORDER BY l.updated_at DESC`)
    : await ctx.pool.query<ListingRow>(`${SELECT_LISTING} WHERE l.publisher_id = $1 ORDER BY l.updated_at DESC`, [actor.id]);
  return rows.map(toSummary);
}

/**
 * A listing the actor may manage. Another publisher's listing answers 404, exactly like a missing one,
 * so listing ids of other publishers cannot be probed.
 */
export async function getOwnedListing(ctx: AppContext, actor: Actor, id: string): Promise<ListingSummary & { publisherId: string }> {
  if (!/^[0-9a-f-]{36}$/i.test(id)) throw notFound('No such listing.');
  const { rows } = await ctx.pool.query<ListingRow>(`${SELECT_LISTING} WHERE l.id = $1`, [id]);
  const row = rows[0];
  if (!row || (row.publisher_id !== actor.id && !isAdmin(actor))) throw notFound('No such listing.');
  return { ...toSummary(row), publisherId: row.publisher_id };
}

export async function createListing(ctx: AppContext, actor: Actor, input: ListingCreateRequest): Promise<ListingSummary> {
  try {
    const { rows } = await ctx.pool.query<{ id: string }>(
      `INSERT INTO listings (publisher_id, slug, title, summary, description_md, tags, licence, contact)
       VALUES ($1, $2, $3, $4, $5, $6, $7, $8) RETURNING id`,
      [actor.id, input.slug, input.title, input.summary, input.descriptionMd, input.tags, input.licence, input.contact],
    );
    return getOwnedListing(ctx, actor, rows[0]!.id);
  } catch (error) {
    if ((error as { code?: string }).code === '23505') throw conflict('That slug is taken; choose another.', { slug: ['That slug is taken; choose another.'] });
    throw error;
  }
}

const COLUMN: Record<keyof ListingUpdateRequest, string> = { title: 'title', summary: 'summary', descriptionMd: 'description_md', tags: 'tags', licence: 'licence', contact: 'contact' };

export async function updateListing(ctx: AppContext, actor: Actor, id: string, input: ListingUpdateRequest): Promise<ListingSummary> {
  await getOwnedListing(ctx, actor, id);
  const sets: string[] = [];
  const values: unknown[] = [];
  for (const [key, column] of Object.entries(COLUMN) as [keyof ListingUpdateRequest, string][]) {
    if (input[key] === undefined) continue;
    values.push(input[key]);
    sets.push(`${column} = $${values.length}`);
  }
  if (sets.length) {
    values.push(id);
    await ctx.pool.query(`UPDATE listings SET ${sets.join(', ')}, updated_at = now() WHERE id = $${values.length}`, values);
  }
  return getOwnedListing(ctx, actor, id);
}

/** Deletes a listing, its versions, their fact tables and the uploaded originals. Refused while a version is being processed. */
export async function deleteListing(ctx: AppContext, actor: Actor, id: string): Promise<void> {
  await getOwnedListing(ctx, actor, id);
  const { rows } = await ctx.pool.query<{ store_key: number; status: string }>(`SELECT store_key, status FROM kb_versions WHERE listing_id = $1`, [id]);
  if (rows.some((r) => r.status === 'processing' || r.status === 'queued')) throw conflict('A version of this listing is still being processed; cancel it first.');
  for (const row of rows) await dropFactTables(ctx.pool, row.store_key);
  await ctx.pool.query(`DELETE FROM listings WHERE id = $1`, [id]);
  await removeListingFiles(ctx, id);
}

/** Markdown → HTML, sanitised: only formatting tags survive; links get rel=noopener and no scripts, styles or event handlers. */
export function renderDescription(markdown: string): string {
  const html = marked.parse(markdown, { async: false, gfm: true }) as string;
  return sanitizeHtml(html, {
    allowedTags: ['h1', 'h2', 'h3', 'h4', 'p', 'br', 'hr', 'ul', 'ol', 'li', 'strong', 'em', 'code', 'pre', 'blockquote', 'a', 'table', 'thead', 'tbody', 'tr', 'th', 'td', 'del'],
    allowedAttributes: { a: ['href', 'title'] },
    allowedSchemes: ['http', 'https', 'mailto'],
    transformTags: { a: sanitizeHtml.simpleTransform('a', { rel: 'noopener noreferrer nofollow', target: '_blank' }) },
  });
}

interface CatalogueRow { slug: string; title: string; summary: string; tags: string[]; number: number; fact_count: string }

/** The public catalogue: listings with a published, ready version. */
export async function catalogue(ctx: AppContext, filter: { q?: string; tag?: string } = {}): Promise<CatalogueEntry[]> {
  const where = [`v.status = 'ready'`];
  const values: unknown[] = [];
  if (filter.q) {
    values.push(`%${filter.q.replace(/[\\%_]/g, (c) => '\\' + c)}%`);
    where.push(`(l.title ILIKE $${values.length} OR l.summary ILIKE $${values.length})`);
  }
  if (filter.tag) {
    values.push(filter.tag);
    where.push(`$${values.length} = ANY (l.tags)`);
  }
  const { rows } = await ctx.pool.query<CatalogueRow>(
    `SELECT l.slug, l.title, l.summary, l.tags, v.number, v.fact_count FROM listings l JOIN kb_versions v ON v.id = l.published_version_id
      WHERE ${where.join(' AND ')} ORDER BY l.title`,
    values,
  );
  return rows.map((r) => ({ slug: r.slug, title: r.title, summary: r.summary, tags: r.tags, publishedVersion: r.number, factCount: Number(r.fact_count ?? 0) }));
}

/** Turns the stored per-IRI counts into sorted entries (largest first). */
export function countEntries(map: Record<string, { asserted: number; entailed: number }> | undefined): PredicateCountEntry[] {
  return Object.entries(map ?? {})
    .map(([iri, c]) => ({ iri, asserted: c.asserted, entailed: c.entailed }))
    .sort((a, b) => b.entailed - a.entailed || a.iri.localeCompare(b.iri));
}

/** The public detail of a published listing; null when it does not exist or serves no version. */
export async function publicListing(ctx: AppContext, slug: string): Promise<PublicListing | null> {
  const { rows } = await ctx.pool.query(
    `SELECT l.slug, l.title, l.summary, l.tags, l.description_md, l.licence, l.contact, v.number, v.fact_count, v.counts, v.finished_at
       FROM listings l JOIN kb_versions v ON v.id = l.published_version_id WHERE l.slug = $1 AND v.status = 'ready'`,
    [slug],
  );
  const row = rows[0];
  if (!row) return null;
  const base = ctx.config.publicUrl;
  const classes = countEntries(row.counts?.perClass);
  const properties = countEntries(row.counts?.perProperty);
  const someClass = classes[0]?.iri ?? 'http://www.w3.org/2002/07/owl#Thing';
  const someProperty = properties[0]?.iri;
  const examples = [
    { title: `Every member of ${someClass}`, command: `curl -H "Authorization: Bearer $THENCE_KEY" "${base}/api/v1/kbs/${slug}/facts?predicate=${encodeURIComponent('http://www.w3.org/1999/02/22-rdf-syntax-ns#type')}&object=${encodeURIComponent(someClass)}"` },
    ...(someProperty ? [{ title: `Facts of ${someProperty}`, command: `curl -H "Authorization: Bearer $THENCE_KEY" "${base}/api/v1/kbs/${slug}/facts?predicate=${encodeURIComponent(someProperty)}&limit=100"` }] : []),
    {
      title: 'The same as a SPARQL query',
      command: `curl -H "Authorization: Bearer $THENCE_KEY" -H "Accept: application/sparql-results+json" --data-urlencode "query=SELECT ?x WHERE { ?x a <${someClass}> } LIMIT 10" "${base}/api/v1/kbs/${slug}/sparql"`,
    },
  ];
  return {
    slug: row.slug,
    title: row.title,
    summary: row.summary,
    tags: row.tags,
    publishedVersion: row.number,
    factCount: Number(row.fact_count ?? 0),
    descriptionHtml: renderDescription(row.description_md),
    licence: row.licence,
    contact: row.contact,
    builtAt: row.finished_at ? new Date(row.finished_at).toISOString() : null,
    vocabulary: { classes, properties },
    examples,
  };
}
