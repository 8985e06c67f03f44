/**
 * The one place where requests are answered at the Node.js HTTP server, before Next.js sees them
 * (installed once per process by instrumentation.ts): a patch of `http.Server.prototype.emit` for
 * 'request' events, since `next start` creates its server itself and offers no hook ahead of its
 * pipeline. Each step answers or passes:
 * - TRACE/TRACK → 405 (lib/security/forbiddenMethods.ts: Next.js would fail them with 500);
 * - kept public answers (lib/server/keptFront.ts: Next.js's own pipeline costs more CPU per request
 *   than a kept answer is worth).
 * Everything else reaches Next.js unchanged.
 */
import http from 'node:http';
import { refuseForbiddenMethod } from '@/lib/security/forbiddenMethods';
import { keptAnswerFront } from './keptFront';

const PATCHED = Symbol.for('hotlap.front');

export function installFront() {
  const proto = http.Server.prototype as http.Server & { [PATCHED]?: boolean };
  if (proto[PATCHED]) return;
  proto[PATCHED] = true;
  const kept = process.env.HOTLAP_PAGE_CACHE !== '0';
  const emit = proto.emit as (this: http.Server, e: string | symbol, ...a: unknown[]) => boolean;
  proto.emit = function (this: http.Server, event: string | symbol, ...args: unknown[]) {
    if (event === 'request') {
      const [req, res] = args as [http.IncomingMessage, http.ServerResponse];
      if (refuseForbiddenMethod(req, res)) return true;
      if (kept && keptAnswerFront(req, res, () => emit.call(this, event, ...args))) return true;
    }
    return emit.call(this, event, ...args);
  } as typeof proto.emit;
}
