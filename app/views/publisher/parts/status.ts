// Labels and tag types for version statuses and stages, shared by the publisher's pages.
import type { StageName, VersionStatus } from '@shared/listings';

export const STATUS_LABELS: Record<VersionStatus, string> = {
  queued: 'Waiting',
  processing: 'Working',
  ready: 'Ready',
  failed: 'Failed',
  inconsistent: 'Inconsistent',
  cancelled: 'Cancelled',
};

export const STATUS_TAGS: Record<VersionStatus, 'info' | 'warning' | 'success' | 'danger' | 'primary'> = {
  queued: 'info',
  processing: 'primary',
  ready: 'success',
  failed: 'danger',
  inconsistent: 'danger',
  cancelled: 'info',
};

export const STAGE_LABELS: Record<StageName, string> = {
  parse: 'Read files',
  profile: 'Check profile',
  normalise: 'Normal form',
  rewrite: 'Rewrite to rules',
  materialise: 'Compute facts',
  store: 'Store in database',
};

export const isRunning = (status: VersionStatus) => status === 'queued' || status === 'processing';

export const formatDateTime = (iso: string | null) => (iso ? new Date(iso).toLocaleString(undefined, { dateStyle: 'medium', timeStyle: 'short' }) : '—');
export const formatCount = (n: number | null | undefined) => (n === null || n === undefined ? '—' : n.toLocaleString('en'));

/** Shortens an IRI for display: the part after the last # or /, with the namespace kept in the title attribute. */
export function localName(iri: string): string {
  if (iri.startsWith('"')) return iri.length > 60 ? iri.slice(0, 57) + '…' : iri;
  const match = /[#/]([^#/]+)$/.exec(iri);
  return match ? match[1]! : iri;
}
