/**
 * A request body the app stops reading half-way (`readLimited` at its limit, formidable at its
 * size limit) must not cut off the app's answer.
 *
 * Two things closed such a connection with a reset, racing the answer: Next.js's request stream
 * destroys the request when the app cancels it (and an incomplete request destroys its socket,
 * Node's IncomingMessage._destroy), and Node.js itself destroys the socket as soon as an answer to
 * an unfinished request is written. Closing a socket that still has unread bytes from the client
 * sends a TCP reset, and a reset can make the client drop an answer it has received but not yet
 * read. Measured with 60 chunked 8 MB bodies, 3 at a time, against one server: 1–2 clients per run
 * got no sentence (a bare 413 with an empty body, or a reset before any answer).
 *
 * So, for requests that carry a body, a socket close without an error while the body is unfinished
 * becomes a lingering close: wait until the answer is written, send our FIN, read and discard what
 * the client still sends for at most LINGER_MS, then destroy. Errors (a client reset, a timeout)
 * still destroy at once, and a request whose body was read to the end is not touched.
 */
import type http from 'node:http';

/** How long the rest of an abandoned body is read and discarded after the answer. */
export const LINGER_MS = 2_000;

function carriesBody(req: http.IncomingMessage): boolean {
  const length = req.headers['content-length'];
  return req.headers['transfer-encoding'] !== undefined || (length !== undefined && length !== '0');
}

export function deferAbandonedBody(req: http.IncomingMessage, res: http.ServerResponse): void {
  const socket = req.socket;
  if (!carriesBody(req) || !socket) return;
  const destroyNow = socket.destroy.bind(socket);
  const original = socket.destroy;
  let lingering = false;
  const linger = () => {
    const timer = setTimeout(() => destroyNow(), LINGER_MS);
    timer.unref();
    socket.once('close', () => clearTimeout(timer));
    req.resume(); // the rest of the body is read and dropped, not buffered
    if (!socket.writableEnded) socket.end();
  };
  socket.destroy = function (this: typeof socket, err?: Error) {
    if (err || lingering || req.complete) return destroyNow(err);
    lingering = true;
    if (res.writableFinished) linger();
    else {
      res.once('finish', linger);
      res.once('close', () => {
        if (!res.writableFinished) destroyNow();
      });
    }
    return this;
  } as typeof socket.destroy;
  // A kept-alive socket serves the next request with its own destroy again.
  res.once('close', () => {
    if (!lingering && socket.destroy !== original) socket.destroy = original;
  });
}
