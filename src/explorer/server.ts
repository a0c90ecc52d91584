/**
 * The explorer's web server: serves a fixed set of in-memory files (the page,
 * its scripts and style, and the one scenario) on 127.0.0.1. A request is
 * answered only when its raw path equals one of those names exactly; every
 * other path (including encoded or literal "..", absolute paths and absolute
 * URLs) gets 404, so no request can reach the file system. Nothing is
 * written; only GET and HEAD are answered.
 */
import { createServer, type IncomingMessage, type Server, type ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';

export interface ServedFile {
  readonly type: string;
  readonly body: Buffer;
}

/** Content security policy of the page: its own scripts and workers only, images drawn locally. */
export const PAGE_POLICY = "default-src 'self'; img-src 'self' data: blob:; worker-src 'self'; connect-src 'self'; object-src 'none'; base-uri 'none'; form-action 'none'; frame-ancestors 'none'";

export interface ExplorerServer {
  readonly url: string;
  readonly server: Server;
  close(): Promise<void>;
}

/** The served name of a request, or null: the query string is ignored, nothing is decoded or normalised. */
export function servedName(rawUrl: string | undefined): string | null {
  if (rawUrl === undefined || !rawUrl.startsWith('/')) return null;
  const q = rawUrl.search(/[?#]/);
  const path = q < 0 ? rawUrl : rawUrl.slice(0, q);
  return path === '/' ? '/index.html' : path;
}

/** Start serving `files` (keys are paths such as "/app.js") on 127.0.0.1; port 0 picks a free port. */
export function startExplorerServer(files: ReadonlyMap<string, ServedFile>, port = 0): Promise<ExplorerServer> {
  let allowedHosts: Set<string> = new Set();
  const handle = (req: IncomingMessage, res: ServerResponse) => {
    const name = servedName(req.url);
    const file = name === null ? undefined : files.get(name);
    // a page elsewhere that points a name at 127.0.0.1 (DNS rebinding) sends another Host
    const hostOk = allowedHosts.has((req.headers.host ?? '').toLowerCase());
    const method = req.method ?? '';
    if (file === undefined || !hostOk || (method !== 'GET' && method !== 'HEAD')) {
      res.writeHead(404, { 'Content-Type': 'text/plain; charset=utf-8', 'Cache-Control': 'no-store', 'X-Content-Type-Options': 'nosniff' });
      res.end('not found\n');
      return;
    }
    res.writeHead(200, {
      'Content-Type': file.type,
      'Content-Length': String(file.body.length),
      'Cache-Control': 'no-store',
      'X-Content-Type-Options': 'nosniff',
      'Content-Security-Policy': PAGE_POLICY,
      'Referrer-Policy': 'no-referrer',
    });
    res.end(method === 'HEAD' ? undefined : file.body);
  };
  const server = createServer(handle);
  return new Promise((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, '127.0.0.1', () => {
      server.off('error', reject);
      const p = (server.address() as AddressInfo).port;
      allowedHosts = new Set([`127.0.0.1:${p}`, `localhost:${p}`]);
      resolve({
        url: `http://127.0.0.1:${p}/`,
        server,
        close: () =>
          new Promise<void>((done) => {
            server.close(() => done());
            server.closeAllConnections();
          }),
      });
    });
  });
}
