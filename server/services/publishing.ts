// Publishing: which ready version a listing serves (switching is one UPDATE, so subscribers see the old version until the new
// one is in place), rolling back to an earlier ready version, unpublishing; and the mail to the publisher when a version ends.
import type { AppContext } from '../context.js';
import { conflict } from '../http/errors.js';
import { sendMail } from './mail.js';
import { appendLog, loadVersion, type VersionRow } from './versions.js';

/** Makes a ready version the served one. Works for newer and older versions alike (an older one is a roll-back). */
export async function publishVersion(ctx: AppContext, row: VersionRow): Promise<void> {
  if (row.status !== 'ready') {
    const why = row.status === 'inconsistent' ? 'it is inconsistent; an inconsistent knowledge base entails everything and cannot be published' : `it is ${row.status}; only ready versions can be published`;
    throw conflict(`Version ${row.number} cannot be published: ${why}.`);
  }
  // The status condition inside the UPDATE closes the race with a concurrent delete or re-processing.
  const { rowCount } = await ctx.pool.query(
    `UPDATE listings SET published_version_id = $2, updated_at = now() WHERE id = $1 AND EXISTS (SELECT 1 FROM kb_versions WHERE id = $2 AND listing_id = $1 AND status = 'ready')`,
    [row.listing_id, row.id],
  );
  if (!rowCount) throw conflict(`Version ${row.number} is no longer ready.`);
  const previous = row.published_version_id && row.published_version_id !== row.id ? await loadVersion(ctx.pool, row.published_version_id) : null;
  await appendLog(ctx.pool, row.id, previous ? `Published, replacing version ${previous.number}.` : 'Published.');
}

export async function unpublishListing(ctx: AppContext, listingId: string): Promise<void> {
  await ctx.pool.query(`UPDATE listings SET published_version_id = NULL, updated_at = now() WHERE id = $1`, [listingId]);
}

const escapeHtml = (text: string): string => text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

/** Mails the listing's publisher that a version is ready, failed or inconsistent. Mail trouble is logged, never fatal. */
export async function notifyVersionFinished(ctx: AppContext, versionId: string): Promise<void> {
  try {
    const { rows } = await ctx.pool.query(
      `SELECT v.number, v.status, v.error, v.fact_count, l.title, u.email, u.name FROM kb_versions v JOIN listings l ON l.id = v.listing_id JOIN users u ON u.id = l.publisher_id WHERE v.id = $1`,
      [versionId],
    );
    const r = rows[0];
    if (!r) return;
    const link = `${ctx.config.publicUrl}/publisher/versions/${versionId}`;
    const ready = r.status === 'ready';
    const subject = ready ? `${r.title}: version ${r.number} is ready to publish` : `${r.title}: version ${r.number} ${r.status === 'inconsistent' ? 'is inconsistent' : 'failed'}`;
    const lines = ready
      ? [`Version ${r.number} of "${r.title}" was processed: ${Number(r.fact_count).toLocaleString('en')} facts are stored.`, 'Check the facts in the browser, then publish the version to serve it to subscribers.']
      : [`Version ${r.number} of "${r.title}" could not be made ready.`, r.error ?? 'See the version page for the diagnostics.'];
    const text = [`Hello ${r.name},`, '', ...lines, '', `Open the version: ${link}`, '', '— Thence'].join('\n');
    const html = [`<p>Hello ${escapeHtml(r.name)},</p>`, ...lines.map((l) => `<p>${escapeHtml(l)}</p>`), `<p><a href="${escapeHtml(link)}">Open the version</a></p>`, '<p>— Thence</p>'].join('\n');
    await sendMail(ctx, { to: r.email, subject, text, html });
  } catch (error) {
    await appendLog(ctx.pool, versionId, `The notification mail could not be sent: ${(error as Error).message}`, 'warning').catch(() => undefined);
  }
}

export type { VersionRow };
