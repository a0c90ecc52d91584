/**
 * The browser's stand-in for `node:fs` (the bundler maps `node:fs` to this
 * module): the data files that src/ reads with readFileSync are bundled into
 * the page as JSON and handed out by name. Any other file is an error.
 */
import scatteringFactors from '../data/electron-scattering-factors.json';
import materials from '../data/materials.json';

const BUNDLED: Readonly<Record<string, unknown>> = {
  'electron-scattering-factors.json': scatteringFactors,
  'materials.json': materials,
};

export function readFileSync(path: string | URL): string {
  const p = typeof path === 'string' ? path : path.pathname;
  const name = p.slice(p.lastIndexOf('/') + 1);
  const doc = BUNDLED[name];
  if (doc === undefined) throw new Error(`the page has no file ${p} (only the bundled data files)`);
  return JSON.stringify(doc);
}

export function existsSync(): boolean {
  return false;
}
