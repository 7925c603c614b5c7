// The publisher's and the catalogue's calls: listings, uploads with progress, versions, facts; one function per route.
import { api, ApiError, query } from './client';
import type {
  CatalogueEntry,
  CsvMappingInput,
  ListingCreateRequest,
  ListingSummary,
  ListingUpdateRequest,
  LogLine,
  PublicListing,
  VersionDetail,
  VersionSummary,
} from '@shared/listings';

export interface FactRow { subject: string; predicate: string; object: string; asserted: boolean }

export const listMyListings = () => api.get<{ listings: ListingSummary[] }>('/api/publisher/listings').then((r) => r.listings);
export const getListing = (id: string) => api.get<{ listing: ListingSummary; versions: VersionSummary[] }>(`/api/publisher/listings/${id}`);
export const createListing = (body: ListingCreateRequest) => api.post<{ listing: ListingSummary }>('/api/publisher/listings', body).then((r) => r.listing);
export const updateListing = (id: string, body: ListingUpdateRequest) => api.patch<{ listing: ListingSummary }>(`/api/publisher/listings/${id}`, body).then((r) => r.listing);
export const deleteListing = (id: string) => api.delete<void>(`/api/publisher/listings/${id}`);
export const unpublishListing = (id: string) => api.post<{ listing: ListingSummary }>(`/api/publisher/listings/${id}/unpublish`).then((r) => r.listing);

export const getVersion = (id: string) => api.get<{ version: VersionDetail; log: LogLine[] }>(`/api/publisher/versions/${id}`);
export const getVersionStatus = (id: string, after: number) => api.get<{ version: VersionSummary; log: LogLine[] }>(`/api/publisher/versions/${id}/status${query({ after })}`);
export const cancelVersion = (id: string) => api.post<{ version: VersionSummary }>(`/api/publisher/versions/${id}/cancel`).then((r) => r.version);
export const publishVersion = (id: string) => api.post<{ version: VersionSummary }>(`/api/publisher/versions/${id}/publish`).then((r) => r.version);
export const rerunVersion = (id: string, mode: 'strict' | 'approximate') => api.post<{ version: VersionSummary }>(`/api/publisher/versions/${id}/rerun`, { mode }).then((r) => r.version);
export const deleteVersion = (id: string) => api.delete<void>(`/api/publisher/versions/${id}`);
export const programUrl = (id: string, download = false) => `/api/publisher/versions/${id}/program${download ? '?download' : ''}`;
export const fileUrl = (versionId: string, fileId: string) => `/api/publisher/versions/${versionId}/files/${fileId}`;

export async function getProgram(id: string): Promise<string> {
  const res = await fetch(programUrl(id), { credentials: 'same-origin' });
  if (!res.ok) throw new ApiError(res.status, { code: 'http_' + res.status, message: 'The rule program could not be loaded.' });
  return res.text();
}

export const getFacts = (id: string, filter: { subject?: string; predicate?: string; object?: string; limit: number; cursor?: string | null }) =>
  api.get<{ facts: FactRow[]; nextCursor: string | null }>(`/api/publisher/versions/${id}/facts${query(filter)}`);

export const getCatalogue = (q?: string) => api.get<{ listings: CatalogueEntry[] }>(`/api/listings${query({ q })}`).then((r) => r.listings);
export const getPublicListing = (slug: string) => api.get<{ listing: PublicListing }>(`/api/listings/${encodeURIComponent(slug)}`).then((r) => r.listing);

export interface UploadInput {
  ontology: File;
  datasets: File[];
  mode: 'strict' | 'approximate';
  notice: boolean;
  csvMappings: Record<string, CsvMappingInput>;
}

/**
 * Sends a version upload as multipart/form-data through XMLHttpRequest, which (unlike fetch) reports upload progress.
 * Text fields go first so the server reads them before the files.
 */
export async function uploadVersion(listingId: string, input: UploadInput, onProgress: (fraction: number) => void): Promise<VersionSummary> {
  const form = new FormData();
  form.append('notice', input.notice ? 'true' : 'false');
  form.append('mode', input.mode);
  if (Object.keys(input.csvMappings).length) form.append('csvMappings', JSON.stringify(input.csvMappings));
  form.append('ontology', input.ontology, input.ontology.name);
  for (const file of input.datasets) form.append('datasets', file, file.name);
  const token = await api.csrf();
  return new Promise<VersionSummary>((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', `/api/publisher/listings/${listingId}/versions`);
    xhr.setRequestHeader('X-CSRF-Token', token);
    xhr.setRequestHeader('Accept', 'application/json');
    xhr.withCredentials = true;
    xhr.upload.onprogress = (event) => {
      if (event.lengthComputable) onProgress(event.loaded / event.total);
    };
    xhr.onerror = () => reject(new TypeError('network error'));
    xhr.onload = () => {
      let body: { version?: VersionSummary; error?: { code: string; message: string; fields?: Record<string, string[]> } } = {};
      try {
        body = JSON.parse(xhr.responseText || '{}');
      } catch {
        body = { error: { code: 'bad_response', message: 'The server sent an unreadable answer.' } };
      }
      if (xhr.status === 201 && body.version) resolve(body.version);
      else reject(new ApiError(xhr.status, body.error ?? { code: 'http_' + xhr.status, message: xhr.statusText || 'Upload failed.' }));
    };
    xhr.send(form);
  });
}
