// State and object shapes of the local Stripe stand-in: form decoding, ids, Stripe-shaped objects, lists and errors.
// Shapes follow Stripe's API reference for the API version the SDK pins (items carry the billing period; invoices name
// their subscription under parent.subscription_details). Only the fields the app reads plus the usual envelope are filled.
import crypto from 'node:crypto';

export type Obj = Record<string, unknown> & { id: string; object: string; created: number };

/** A Stripe-shaped error, thrown by handlers and answered as `{ error: { type, message, param, code } }`. */
export class StripeStandInError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly type: 'invalid_request_error' | 'card_error' | 'idempotency_error' | 'api_error' | 'authentication_error' = 'invalid_request_error',
    readonly code?: string,
    readonly param?: string,
  ) {
    super(message);
  }
  toBody(): { error: Record<string, string> } {
    return { error: { type: this.type, message: this.message, ...(this.code ? { code: this.code } : {}), ...(this.param ? { param: this.param } : {}) } };
  }
}

export const missing = (kind: string, id: string) => new StripeStandInError(404, `No such ${kind}: '${id}'`, 'invalid_request_error', 'resource_missing', 'id');
export const paramMissing = (param: string) => new StripeStandInError(400, `Missing required param: ${param}.`, 'invalid_request_error', 'parameter_missing', param);
export const paramInvalid = (param: string, message: string) => new StripeStandInError(400, message, 'invalid_request_error', 'parameter_invalid', param);

const ALPHABET = 'abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789';
/** Returns a Stripe-looking id: the prefix, an underscore and 24 base-62 characters. */
export function newId(prefix: string): string {
  const bytes = crypto.randomBytes(24);
  let out = '';
  for (const b of bytes) out += ALPHABET[b % ALPHABET.length];
  return `${prefix}_${out}`;
}

export const now = () => Math.floor(Date.now() / 1000);

/**
 * Decodes an application/x-www-form-urlencoded body the way Stripe reads it: `a[b][0][c]=v` becomes
 * `{ a: { b: [ { c: 'v' } ] } }`; numeric segments make arrays; empty value `a=` means "unset" and stays ''.
 */
export function decodeForm(body: string): Record<string, unknown> {
  const root: Record<string, unknown> = {};
  if (!body) return root;
  for (const pair of body.split('&')) {
    if (!pair) continue;
    const eq = pair.indexOf('=');
    const rawKey = decodeURIComponent((eq < 0 ? pair : pair.slice(0, eq)).replace(/\+/g, ' '));
    const value = eq < 0 ? '' : decodeURIComponent(pair.slice(eq + 1).replace(/\+/g, ' '));
    const head = rawKey.match(/^[^[]+/)?.[0];
    if (!head) throw paramInvalid(rawKey, `Invalid parameter name: ${rawKey}`);
    const path = [head, ...[...rawKey.slice(head.length).matchAll(/\[([^\]]*)\]/g)].map((m) => m[1])];
    let node: Record<string, unknown> | unknown[] = root;
    path.forEach((segment, i) => {
      const last = i === path.length - 1;
      const key: string | number = Array.isArray(node) ? (segment === '' ? node.length : Number(segment)) : segment;
      if (last) {
        (node as Record<string | number, unknown>)[key] = value;
        return;
      }
      const nextIsIndex = /^\d*$/.test(path[i + 1]);
      let child = (node as Record<string | number, unknown>)[key];
      if (child === undefined || typeof child !== 'object') {
        child = nextIsIndex ? [] : {};
        (node as Record<string | number, unknown>)[key] = child;
      }
      node = child as Record<string, unknown> | unknown[];
    });
  }
  return root;
}

/** Stripe's list envelope with `starting_after` / `ending_before` / `limit` cursor pagination, newest first. */
export function list(all: Obj[], query: Record<string, unknown>, url: string): Record<string, unknown> {
  const sorted = [...all].sort((a, b) => b.created - a.created || (b as { _seq?: number })._seq! - (a as { _seq?: number })._seq!);
  const limitRaw = query.limit === undefined ? 10 : Number(query.limit);
  if (!Number.isInteger(limitRaw) || limitRaw < 1 || limitRaw > 100) throw paramInvalid('limit', 'Invalid integer: limit must be between 1 and 100.');
  let start = 0;
  let end = sorted.length;
  if (typeof query.starting_after === 'string' && query.starting_after) {
    const at = sorted.findIndex((o) => o.id === query.starting_after);
    if (at < 0) throw missing('object', query.starting_after);
    start = at + 1;
  } else if (typeof query.ending_before === 'string' && query.ending_before) {
    const at = sorted.findIndex((o) => o.id === query.ending_before);
    if (at < 0) throw missing('object', query.ending_before);
    end = at;
    start = Math.max(0, end - limitRaw);
  }
  const data = sorted.slice(start, Math.min(end, start + limitRaw));
  return { object: 'list', data: data.map(publicView), has_more: start + data.length < end, url };
}

/** Drops the stand-in's private bookkeeping fields (those starting with `_`). */
export function publicView(o: Obj): Record<string, unknown> {
  return Object.fromEntries(Object.entries(o).filter(([k]) => !k.startsWith('_')));
}

let seq = 0;
/** The whole account: one map per object kind, plus idempotent responses and webhook endpoints. */
export class StripeAccount {
  readonly objects = new Map<string, Map<string, Obj>>();
  readonly idempotent = new Map<string, { fingerprint: string; status: number; body: unknown }>();

  put<T extends Obj>(o: T): T {
    (o as { _seq?: number })._seq = ++seq;
    let kind = this.objects.get(o.object);
    if (!kind) this.objects.set(o.object, (kind = new Map()));
    kind.set(o.id, o);
    return o;
  }
  get(object: string, id: string, label = object.replace(/^.*\./, '').replace(/_/g, ' ')): Obj {
    const found = this.objects.get(object)?.get(id);
    if (!found) throw missing(label, id);
    return found;
  }
  all(object: string): Obj[] {
    return [...(this.objects.get(object)?.values() ?? [])];
  }

  /** Everything, for the state file (so `npm start` keeps products, prices and subscriptions across restarts). */
  snapshot(): string {
    return JSON.stringify({ seq, objects: [...this.objects.values()].flatMap((m) => [...m.values()]) });
  }

  restore(text: string): void {
    const data = JSON.parse(text) as { seq: number; objects: Obj[] };
    for (const o of data.objects) {
      let kind = this.objects.get(o.object);
      if (!kind) this.objects.set(o.object, (kind = new Map()));
      kind.set(o.id, o);
    }
    seq = Math.max(seq, data.seq);
  }
}

export function metadataOf(value: unknown, param = 'metadata'): Record<string, string> {
  if (value === undefined || value === '') return {};
  if (typeof value !== 'object' || Array.isArray(value)) throw paramInvalid(param, `Invalid object: ${param} must be a hash of strings.`);
  return Object.fromEntries(Object.entries(value as Record<string, unknown>).map(([k, v]) => [k, String(v)]));
}

export function integer(value: unknown, param: string, required = true): number | undefined {
  if (value === undefined || value === '') {
    if (required) throw paramMissing(param);
    return undefined;
  }
  const n = Number(value);
  if (!Number.isInteger(n) || n < 0) throw paramInvalid(param, `Invalid integer: ${String(value)}`);
  return n;
}

export function text(value: unknown, param: string, required = true): string | undefined {
  if (value === undefined || value === '') {
    if (required) throw paramMissing(param);
    return undefined;
  }
  if (typeof value !== 'string') throw paramInvalid(param, `Invalid string: ${param}`);
  return value;
}

export function bool(value: unknown): boolean | undefined {
  if (value === undefined || value === '') return undefined;
  return value === 'true' || value === true;
}

/** Adds one calendar month (UTC) to a Unix time, clamping to the month's last day like Stripe's billing anchor. */
export function addMonth(seconds: number): number {
  const d = new Date(seconds * 1000);
  const day = d.getUTCDate();
  const next = new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + 1, 1, d.getUTCHours(), d.getUTCMinutes(), d.getUTCSeconds()));
  const lastDay = new Date(Date.UTC(next.getUTCFullYear(), next.getUTCMonth() + 1, 0)).getUTCDate();
  next.setUTCDate(Math.min(day, lastDay));
  return Math.floor(next.getTime() / 1000);
}
