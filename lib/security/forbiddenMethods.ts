/**
 * TRACE and TRACK: Next.js turns every incoming request into a WHATWG `Request`, and the Fetch
 * standard calls these two "forbidden methods" — `new Request(url, { method: 'TRACE' })` throws a
 * TypeError — so they failed with HTTP 500 before any code of ours (proxy.ts included) could run.
 * This answers them 405 with an Allow header at the Node.js HTTP server, ahead of Next.js.
 * (CONNECT never reaches a 'request' listener: Node.js emits it as 'connect' and, with no listener,
 * closes the connection.)
 */
import http from 'node:http';

const FORBIDDEN = new Set(['TRACE', 'TRACK']);
const PATCHED = Symbol.for('hotlap.forbiddenMethods');

export function refuseForbiddenMethods() {
  const proto = http.Server.prototype as http.Server & { [PATCHED]?: boolean };
  if (proto[PATCHED]) return;
  proto[PATCHED] = true;
  const emit = proto.emit;
  proto.emit = function (this: http.Server, event: string, ...args: unknown[]) {
    if (event === 'request') {
      const [req, res] = args as [http.IncomingMessage, http.ServerResponse];
      if (FORBIDDEN.has(req.method ?? '')) {
        res.writeHead(405, { Allow: 'GET, HEAD, OPTIONS, POST, PUT, PATCH, DELETE', 'Content-Type': 'application/json', 'X-Frame-Options': 'DENY' });
        res.end(JSON.stringify({ error: `Hotlap does not answer ${req.method} requests.` }));
        return true;
      }
    }
    return (emit as (this: http.Server, e: string, ...a: unknown[]) => boolean).call(this, event, ...args);
  } as typeof proto.emit;
}
