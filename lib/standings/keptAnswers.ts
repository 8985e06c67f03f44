/**
 * The one store of kept public answers: the API answers of `versionedResponse` (http.ts) and the
 * whole pages of the page cache (pageCache.ts), each under its exact URL (path + query) and the
 * value of the standings change counter it was built for.
 *
 * Module instances are per bundle (each route handler, proxy.ts and instrumentation.ts have their
 * own copy of this file), so the state lives on `globalThis` under one `Symbol.for` key: the app
 * bundles write it, and the front layer (lib/server/front.ts, at the Node.js HTTP server, ahead of
 * Next.js) answers from it.
 *
 * How an answer becomes servable by the front layer: the front marks the requests it hands to
 * Next.js with a per-process secret (request header FRONT_HEADER); for such a request the app puts
 * the kept entry's serial in a response header (KEEP_MARKER); the front layer, seeing that header
 * when Next.js writes the answer's head, removes it and records the status and headers Next.js sent
 * for the same entry (`wire`). Only then does the front layer answer that URL itself — with exactly
 * those headers, the body the app kept, and the counter read again per request.
 */
import crypto from 'node:crypto';
import zlib from 'node:zlib';

/** The request header by which the front layer tells the app that it may record this answer. */
export const FRONT_HEADER = 'x-hotlap-front';
/** The response header carrying the kept entry's serial back to the front layer (never sent). */
export const KEEP_MARKER = 'x-hotlap-keep';
/** The request header of the page cache's own renders (pageCache.ts): always Next.js's. */
export const RENDER_HEADER = 'x-hotlap-page-render';
/** Says who answered: `hit` = the front layer, `miss` = Next.js (harmless, for tests and benches). */
export const KEPT_HEADER = 'x-hotlap-kept';

export interface KeptEntry {
  key: string;
  version: number;
  serial: number;
  kind: 'api' | 'page';
  status: number;
  body: string;
  /** Pages: the nonce the page was rendered with (never sent); each answer puts its own in its place. */
  nonce: string | null;
  /** Strong ETag of the body (API answers); null: no conditional answers. */
  etag: string | null;
  /** What the bundle that kept it needs to answer from it again (a BuiltAnswer, the page's headers). */
  app: unknown;
  /** The answer as Next.js sent it (recorded by the front layer), null until then. */
  wire: Wire | null;
  /** The URLs as requested (byte for byte) that Next.js answered with this entry: the front layer's keys. */
  urls: string[];
}

export interface Wire {
  /** Status line and headers as Next.js sent them, minus framing (length, encoding, date, connection) and, for pages, the CSP and HSTS (set per answer). */
  headers: [string, string][];
  /** `x-cache` or `x-page-cache` when Next.js's answer carried it (a front answer says HIT). */
  cacheHeader: string | null;
  /** The body split at the render nonce (one part for API answers). */
  parts: Buffer[];
  /** gzip of the body (API) or of each part (pages), made on the first answer that may use it. */
  gzip: Buffer[] | null;
}

interface Store {
  /** By the URL as the app sees it (Next.js normalizes the query: `%20` → `+`, …). */
  entries: Map<string, KeptEntry>;
  /** By the URL as sent, for the front layer: only URLs that Next.js answered with that entry. */
  byUrl: Map<string, KeptEntry>;
  chars: number;
  serial: number;
  secret: string;
}

const STORE = Symbol.for('hotlap.keptAnswers');
/** Entries (pages per query, API answers per query); least recently used go first. */
const KEPT_MAX = 800;
/** Body characters kept (the front layer holds a second copy as bytes, and gzip). */
const KEPT_MAX_CHARS = 64 * 1024 * 1024;
/** One body larger than this is answered but not kept (a whole-class CSV can be big). */
export const KEPT_MAX_BODY_CHARS = 8 * 1024 * 1024;

export function keptStore(): Store {
  const g = globalThis as typeof globalThis & { [STORE]?: Store };
  g[STORE] ??= { entries: new Map(), byUrl: new Map(), chars: 0, serial: 0, secret: crypto.randomBytes(18).toString('base64url') };
  return g[STORE];
}

/** The kept entry for `key` if it was built for `version` (most recently used last). */
export function keptFor(key: string, version: number, kind: KeptEntry['kind']): KeptEntry | undefined {
  const { entries } = keptStore();
  const hit = entries.get(key);
  if (!hit || hit.version !== version || hit.kind !== kind) return undefined;
  entries.delete(key);
  entries.set(key, hit);
  return hit;
}

export function keepEntry(key: string, e: Omit<KeptEntry, 'key' | 'serial' | 'wire' | 'urls'>): KeptEntry | null {
  if (e.body.length > KEPT_MAX_BODY_CHARS) return null;
  const store = keptStore();
  forget(key);
  const entry: KeptEntry = { ...e, key, serial: ++store.serial, wire: null, urls: [] };
  store.entries.set(key, entry);
  store.chars += e.body.length;
  while (store.entries.size > KEPT_MAX || store.chars > KEPT_MAX_CHARS) forget(store.entries.keys().next().value as string);
  return entry;
}

function forget(key: string) {
  const store = keptStore();
  const k = store.entries.get(key);
  if (!k) return;
  store.chars -= k.body.length;
  store.entries.delete(key);
  for (const url of k.urls) if (store.byUrl.get(url) === k) store.byUrl.delete(url);
}

/** The kept entry the front layer may answer `url` (as sent) from: the current entry of its key, with Next.js's head recorded. */
export function keptForUrl(url: string): KeptEntry | undefined {
  const store = keptStore();
  const e = store.byUrl.get(url);
  return e && e.wire && store.entries.get(e.key) === e ? e : undefined;
}

/** Records that Next.js answered `url` (as sent) with `entry`, whose head is `wire`. */
export function recordWire(url: string, entry: KeptEntry, wire: Wire) {
  const store = keptStore();
  if (store.entries.get(entry.key) !== entry) return;
  entry.wire ??= wire;
  if (store.byUrl.get(url) === entry) return;
  entry.urls.push(url);
  store.byUrl.set(url, entry);
}

/** The entry a marker names (`serial key`), if it is still the current one for its key. */
export function markedEntry(marker: string): KeptEntry | undefined {
  const at = marker.indexOf(' ');
  const e = keptStore().entries.get(marker.slice(at + 1));
  return e && String(e.serial) === marker.slice(0, at) ? e : undefined;
}

/** Forget kept answers of one kind, or all (tests and tools that rewrite the database wholesale). */
export function clearKept(kind?: KeptEntry['kind']) {
  const store = keptStore();
  for (const [key, e] of store.entries) if (!kind || e.kind === kind) forget(key);
}

/** True when the front layer handed this request to Next.js and may record its answer. */
export function frontAsked(headers: { get(name: string): string | null }): boolean {
  return headers.get(FRONT_HEADER) === keptStore().secret;
}

/** The marker header for an answer built from `entry`, when the front layer asked for it. */
export function keepMarker(headers: { get(name: string): string | null }, entry: KeptEntry | null | undefined): Record<string, string> {
  return entry && frontAsked(headers) ? { [KEEP_MARKER]: `${entry.serial} ${entry.key}` } : {};
}

/**
 * Request headers by which Next.js's client router, prefetches and server actions ask for another
 * answer than the document at the same URL. A request carrying any of them is never answered from
 * a kept page or by the front layer.
 */
export const OTHER_ANSWERS = ['rsc', 'next-router-prefetch', 'next-router-state-tree', 'next-router-segment-prefetch', 'next-action', 'next-url', 'x-middleware-prefetch', 'x-nextjs-data', 'purpose'];

export function etagOf(body: string): string {
  return `"${crypto.createHash('sha1').update(body).digest('base64url')}"`;
}

/** True when an If-None-Match header names this ETag (weak comparison, "*" matches any). */
export function matchesEtag(header: string | null | undefined, etag: string): boolean {
  if (!header) return false;
  const bare = etag.replace(/^W\//, '');
  return header.split(',').some((t) => {
    const v = t.trim();
    return v === '*' || v.replace(/^W\//, '') === bare;
  });
}

/** True when Accept-Encoding allows gzip (RFC 9110 §12.5.3: a listed coding, or "*", with q > 0). */
export function acceptsGzip(header: string | null | undefined): boolean {
  if (!header) return false;
  for (const item of header.split(',')) {
    const [coding, ...params] = item.trim().toLowerCase().split(';');
    if (coding !== 'gzip' && coding !== 'x-gzip' && coding !== '*') continue;
    const q = params.map((p) => p.trim()).find((p) => p.startsWith('q='));
    if (!q || Number(q.slice(2)) > 0) return true;
  }
  return false;
}

const GZIP_HEADER = Buffer.from([0x1f, 0x8b, 8, 0, 0, 0, 0, 0, 0, 0xff]);
/** An empty final stored block: ends the deflate stream after byte-aligned blocks. */
const FINAL_BLOCK = Buffer.from([0x01, 0x00, 0x00, 0xff, 0xff]);

/**
 * gzip copies made once per kept body. A body without a nonce is one gzip member. A page's parts
 * (the body split at its render nonce) are each deflated on their own and end byte-aligned (a sync
 * flush, no final block), so that an answer is those blocks with its own nonce between them as
 * stored blocks (RFC 1951 §3.2.4) — one valid gzip stream (RFC 1952) per answer without
 * compressing the page again. Only the CRC-32 of the whole body is computed per answer.
 */
export function gzipParts(parts: Buffer[]): Buffer[] {
  if (parts.length === 1) return [zlib.gzipSync(parts[0])];
  return parts.map((p) => zlib.deflateRawSync(p, { finishFlush: zlib.constants.Z_SYNC_FLUSH }));
}

/** The gzip body of an answer made of `parts` (from gzipParts) with `filler` between them. */
export function gzipAnswer(parts: Buffer[], gzip: Buffer[], filler: Buffer): Buffer {
  if (gzip.length === 1) return gzip[0];
  const stored = Buffer.alloc(5 + filler.length);
  stored[0] = 0; // BFINAL 0, BTYPE 00 (stored), padded to the byte
  stored.writeUInt16LE(filler.length, 1);
  stored.writeUInt16LE(~filler.length & 0xffff, 3);
  filler.copy(stored, 5);
  let crc = 0;
  let size = 0;
  const out: Buffer[] = [GZIP_HEADER];
  parts.forEach((p, i) => {
    if (i > 0) {
      out.push(stored);
      crc = zlib.crc32(filler, crc);
      size += filler.length;
    }
    out.push(gzip[i]);
    if (p.length) crc = zlib.crc32(p, crc); // (an empty buffer may reset it to 0 on Node.js 20)
    size += p.length;
  });
  const trailer = Buffer.alloc(8);
  trailer.writeUInt32LE(crc >>> 0, 0);
  trailer.writeUInt32LE(size >>> 0, 4);
  out.push(FINAL_BLOCK, trailer);
  return Buffer.concat(out);
}
