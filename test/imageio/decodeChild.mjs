// Decodes files with the compiled reader (dist/) in a child process, so the
// test runner can enforce a time limit by killing it. One JSON line per file,
// written synchronously: after a kill, the first file without a line is the one that hung.
import { readFileSync, writeSync } from 'node:fs';
const { decodeImage } = await import(new URL('../../dist/imageio/readImage.js', import.meta.url).href);
for (const file of process.argv.slice(2)) {
  let out;
  try {
    const img = decodeImage(readFileSync(file), file);
    out = { ok: true, width: img.width, height: img.height, data: Array.from(img.data) };
  } catch (e) {
    out = { ok: false, inputError: e?.name === 'InputError', message: String(e?.message ?? e) };
  }
  writeSync(1, `${JSON.stringify(out)}\n`);
}
