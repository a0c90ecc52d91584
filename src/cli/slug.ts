/** Default output folder names. */
import { createHash } from 'node:crypto';

/**
 * Folder name for a scenario name: lower-case Latin letters and digits joined
 * by '-'. When the name holds anything else (accents, other scripts) a short
 * hash of the whole name is appended, so names that differ only there stay
 * in different folders.
 */
export function slug(name: string): string {
  const base = name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '').slice(0, 60).replace(/-$/, '');
  const plain = /^[A-Za-z0-9 _.-]*$/.test(name) && base !== '';
  if (plain) return base;
  const hash = createHash('sha256').update(name, 'utf8').digest('hex').slice(0, 8);
  return base === '' ? `scenario-${hash}` : `${base}-${hash}`;
}
