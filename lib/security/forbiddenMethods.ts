/**
 * TRACE and TRACK: Next.js turns every incoming request into a WHATWG `Request`, and the Fetch
 * standard calls these two "forbidden methods" — `new Request(url, { method: 'TRACE' })` throws a
 * TypeError — so they failed with HTTP 500 before any code of ours (proxy.ts included) could run.
 * This answers them 405 with an Allow header at the Node.js HTTP server, ahead of Next.js
 * (lib/server/front.ts).
 * (CONNECT never reaches a 'request' listener: Node.js emits it as 'connect' and, with no listener,
 * closes the connection.)
 */
import type http from 'node:http';

const FORBIDDEN = new Set(['TRACE', 'TRACK']);

/** Answers TRACE/TRACK with 405 (true) or leaves the request alone (false). Run by lib/server/front.ts. */
export function refuseForbiddenMethod(req: http.IncomingMessage, res: http.ServerResponse): boolean {
  if (!FORBIDDEN.has(req.method ?? '')) return false;
  res.writeHead(405, { Allow: 'GET, HEAD, OPTIONS, POST, PUT, PATCH, DELETE', 'Content-Type': 'application/json', 'X-Frame-Options': 'DENY' });
  res.end(JSON.stringify({ error: `Hotlap does not answer ${req.method} requests.` }));
  return true;
}
