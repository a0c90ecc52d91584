/**
 * `thinfoil explore <scenario>`: a local page where the imaging conditions of
 * a scenario can be changed and the simulated images follow. The page runs
 * the renderer itself (bundled for the browser, in Web Workers); this
 * command only serves the page's files and the scenario, on 127.0.0.1.
 */
import { readFileSync } from 'node:fs';
import { InputError } from '../errors.js';
import { parseScenario } from '../scenario/parse.js';
import { readScenarioBytes, scenarioJsonOf } from './loadScenario.js';
import { startExplorerServer, type ServedFile } from '../explorer/server.js';

export interface ExploreOptions {
  port?: string;
}

/** The page's files, as built by `npm run build` into dist/explorer/page/. */
const PAGE_FILES: Readonly<Record<string, string>> = {
  '/index.html': 'text/html; charset=utf-8',
  '/style.css': 'text/css; charset=utf-8',
  '/app.js': 'text/javascript; charset=utf-8',
  '/worker.js': 'text/javascript; charset=utf-8',
  '/rocking.js': 'text/javascript; charset=utf-8',
};

export function pageFiles(): Map<string, ServedFile> {
  const files = new Map<string, ServedFile>();
  for (const [name, type] of Object.entries(PAGE_FILES)) {
    const url = new URL(`../explorer/page${name}`, import.meta.url);
    let body: Buffer;
    try {
      body = readFileSync(url);
    } catch {
      throw new Error(`the explorer page file ${url.pathname} is missing; build the package first (npm run build)`);
    }
    files.set(name, { type, body });
  }
  return files;
}

function readPort(text: string | undefined): number {
  if (text === undefined) return 0;
  const p = Number(text);
  if (!(Number.isInteger(p) && p >= 0 && p <= 65535)) throw new InputError(`--port ${text} is not a port number; give an integer 1..65535, or 0 for a free port`);
  return p;
}

export async function exploreCommand(scenarioPath: string, opts: ExploreOptions): Promise<void> {
  const port = readPort(opts.port);
  // read once: the bytes served are the bytes checked
  const bytes = readScenarioBytes(scenarioPath);
  parseScenario(scenarioJsonOf(bytes, scenarioPath)); // a scenario the renderer refuses is refused here, before anything is served
  const files = pageFiles();
  files.set('/scenario.json', { type: 'application/json; charset=utf-8', body: bytes });
  let srv;
  try {
    srv = await startExplorerServer(files, port);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'EADDRINUSE' || code === 'EACCES') throw new InputError(`--port ${port} cannot be used (${code}); choose another port or leave --port out for a free one`);
    throw e;
  }
  process.stdout.write(`thinfoil explore: ${srv.url}  (open it in a browser; Ctrl-C stops the server)\n`);
  const stop = () => {
    void srv.close().then(() => process.exit(0));
  };
  process.once('SIGINT', stop);
  process.once('SIGTERM', stop);
}
