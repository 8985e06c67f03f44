/**
 * The one place where requests are answered at the Node.js HTTP server, before Next.js sees them
 * (installed once per process by instrumentation.ts): a patch of `http.Server.prototype.emit` for
 * 'request' events, since `next start` creates its server itself and offers no hook ahead of its
 * pipeline. Each step answers or passes:
 * - TRACE/TRACK → 405 (lib/security/forbiddenMethods.ts: Next.js would fail them with 500);
 * - kept public answers (lib/server/keptFront.ts: Next.js's own pipeline costs more CPU per request
 *   than a kept answer is worth).
 * Everything else reaches Next.js, with one change: a request body the app stops reading half-way
 * closes its connection after the answer, not before it (lib/server/abandonedBody.ts).
 */
import http from 'node:http';
import { refuseForbiddenMethod } from '@/lib/security/forbiddenMethods';
import { keptAnswerFront } from './keptFront';
import { deferAbandonedBody } from './abandonedBody';

const PATCHED = Symbol.for('hotlap.front');

/** The kept-answer step; a fault in it hands the request to Next.js rather than failing it. */
function keptFrontOrNext(req: http.IncomingMessage, res: http.ServerResponse, next: () => void): boolean {
  let handedOn = false;
  try {
    return keptAnswerFront(req, res, () => {
      handedOn = true;
      next();
    });
  } catch (err) {
    if (handedOn) throw err; // Next.js's own error, as without this step
    console.error(`kept answers: ${req.url}: ${err instanceof Error ? err.message : err}`);
    return false;
  }
}

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
      deferAbandonedBody(req, res);
      if (kept && keptFrontOrNext(req, res, () => emit.call(this, event, ...args))) return true;
    }
    return emit.call(this, event, ...args);
  } as typeof proto.emit;
}
