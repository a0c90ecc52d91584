// Builds the explorer page into dist/explorer/page/: app.js and worker.js
// (the renderer bundled for the browser by esbuild), index.html and style.css.
// Run by `npm run build` / `npm install` (prepare) / `npm test`.
import { build } from 'esbuild';
import { copyFileSync, mkdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

const here = (p) => fileURLToPath(new URL(p, import.meta.url));
const outdir = here('../dist/explorer/page/');
mkdirSync(outdir, { recursive: true });

// the data files src/ reads through node:fs are bundled (explorer/nodeFsShim.ts)
const nodeFsShim = {
  name: 'node-fs-shim',
  setup(b) {
    b.onResolve({ filter: /^(node:)?fs$/ }, () => ({ path: here('./nodeFsShim.ts') }));
  },
};

await build({
  entryPoints: { app: here('./app.ts'), worker: here('./worker.ts'), rocking: here('./rockingWorker.ts') },
  outdir,
  bundle: true,
  format: 'esm',
  platform: 'browser',
  target: 'es2022',
  minify: false,
  sourcemap: false,
  legalComments: 'none',
  logLevel: 'warning',
  plugins: [nodeFsShim],
});
copyFileSync(here('./index.html'), `${outdir}index.html`);
copyFileSync(here('./style.css'), `${outdir}style.css`);
