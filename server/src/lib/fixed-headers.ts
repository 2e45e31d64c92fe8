import type { IncomingMessage, ServerResponse } from 'node:http';
import type { RequestHandler } from 'express';

type Header = [name: string, value: string | number | readonly string[]];
interface Recorded {
  set: Header[];
  removed: string[];
}

/** What the middleware sets and removes on a stand-in answer; throws unless it finishes synchronously without error. */
function record(middleware: RequestHandler): Recorded {
  const out: Recorded = { set: [], removed: [] };
  let nextCalled = false;
  const res = {
    setHeader(name: string, value: Header[1]) {
      out.set.push([name, value]);
      return res;
    },
    removeHeader(name: string) {
      out.removed.push(name);
    },
    getHeader: () => undefined,
  };
  const req = { method: 'GET', url: '/', headers: {}, secure: false } as unknown as IncomingMessage;
  middleware(req as never, res as never, (err?: unknown) => {
    if (err) throw err instanceof Error ? err : new Error(String(err));
    nextCalled = true;
  });
  if (!nextCalled) throw new Error('fixedHeaders: the middleware did not finish synchronously');
  return out;
}

/**
 * Runs a header-setting middleware (helmet) at start-up against a stand-in answer and returns a
 * middleware that sets the headers it set, in the same order, on every answer. Helmet's headers
 * depend on its options only (no per-request nonce is configured here), and running its dozen small
 * middlewares per request cost about 6 % of the web server's CPU on the upstream API's hot path.
 *
 * Throws at start-up if the middleware does anything but set and remove headers synchronously, or
 * sets different headers on a second run (a per-request CSP nonce, say), so such an option added
 * later cannot be frozen by mistake.
 */
export function fixedHeaders(middleware: RequestHandler): RequestHandler {
  const { set, removed } = record(middleware);
  if (JSON.stringify(record(middleware)) !== JSON.stringify({ set, removed })) {
    throw new Error('fixedHeaders: the middleware sets different headers on each answer');
  }
  return (_req, response: ServerResponse, next) => {
    for (const name of removed) response.removeHeader(name);
    for (const [name, value] of set) response.setHeader(name, value);
    next();
  };
}
