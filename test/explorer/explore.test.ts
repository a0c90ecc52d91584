/**
 * `thinfoil explore` end to end, in a real browser: the compiled CLI serves
 * the page (`npm test` builds dist/ and the browser bundle first), Debian's
 * chromium runs it through playwright-core. The page's float images are
 * compared with the float TIFFs the CLI writes for the same scenario, read by
 * npm's utif (an independent TIFF reader). These checks cover the plumbing
 * (same engine, same scenario, same numbers), not the physics: the physics of
 * the renderer is tested in test/imaging and test/dynamics.
 *
 * Without /usr/bin/chromium the browser tests are skipped on a developer
 * machine and fail under CI=true (.ci/run installs the chromium package); the
 * server tests (404 for everything but its files, Ctrl-C) and the bad-input
 * tests need no browser and always run.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, writeFileSync, copyFileSync } from 'node:fs';
import { request } from 'node:http';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createRequire } from 'node:module';
import type { BrowserContext, Page } from 'playwright-core';

// page-side code in page.evaluate callbacks (this test is compiled without the DOM library)
declare const window: unknown;
declare const document: any;
type HTMLInputElement = { value: string; dispatchEvent(e: unknown): boolean };
type HTMLSelectElement = { value: string; options: ArrayLike<{ text: string }>; dispatchEvent(e: unknown): boolean };
type HTMLCanvasElement = { width: number; height: number };

const ROOT = join(import.meta.dirname, '..', '..');
const CLI = join(ROOT, 'dist', 'cli', 'main.js');
/** Debian's chromium (THINFOIL_CHROMIUM may name another binary of the same package). */
const CHROMIUM = process.env.THINFOIL_CHROMIUM ?? '/usr/bin/chromium';
const IN_CI = process.env.CI === 'true';
const HAVE_CHROMIUM = existsSync(CHROMIUM);
const SCREENSHOT = process.env.THINFOIL_SCREENSHOT === '1';

if (!HAVE_CHROMIUM && IN_CI) throw new Error(`${CHROMIUM} is missing: CI must install Debian's chromium package (.ci/run does)`);
if (!HAVE_CHROMIUM) console.warn(`browser tests of \`thinfoil explore\` skipped: ${CHROMIUM} not found (install Debian's chromium package to run them)`);

// npm utif (independent TIFF reader); it ships no type declarations
const UTIF = createRequire(import.meta.url)('utif') as {
  decode(buf: ArrayBuffer): Record<string, unknown>[];
  decodeImage(buf: ArrayBuffer, ifd: Record<string, unknown>): void;
};

function readFloatTiff(path: string): { width: number; height: number; data: Float32Array } {
  const buf = readFileSync(path);
  const ab = buf.buffer.slice(buf.byteOffset, buf.byteOffset + buf.byteLength);
  const ifds = UTIF.decode(ab);
  UTIF.decodeImage(ab, ifds[0]);
  const ifd = ifds[0] as unknown as { width: number; height: number; data: Uint8Array };
  const data = new Float32Array(ifd.data.buffer.slice(ifd.data.byteOffset, ifd.data.byteOffset + ifd.width * ifd.height * 4));
  return { width: ifd.width, height: ifd.height, data };
}

const LAUNCH_ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'];

/** An invented test foil: one dislocation, small image so that every render is quick. */
const SCENARIO = {
  name: 'explorer test foil (invented)',
  material: 'Cu',
  kV: 200,
  foil: { thickness_nm: 60, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  image: { width_px: 40, height_px: 32, pixel_nm: 1.5 },
  absorption: 0.1,
  conditions: [
    { id: 'g200', g: [2, 0, 0], w: 0.5 },
    { id: 'g020', g: [0, 2, 0], s_per_nm: 0.01 },
  ],
  defects: [{ type: 'dislocation', label: 'A', b: '1/2[1 0 1]', line: [1, 1, 2], point_nm: [2, -3, 30] }],
  candidates: ['1/2<110>'],
};

interface Served {
  proc: ChildProcess;
  url: string;
  port: number;
}

function serve(file: string): Promise<Served> {
  const proc = spawn(process.execPath, [CLI, 'explore', file], { cwd: ROOT, stdio: ['ignore', 'pipe', 'pipe'] });
  return new Promise((resolve, reject) => {
    let out = '';
    let err = '';
    proc.stdout!.on('data', (d) => {
      out += String(d);
      const m = /http:\/\/127\.0\.0\.1:(\d+)\//.exec(out);
      if (m) resolve({ proc, url: m[0], port: Number(m[1]) });
    });
    proc.stderr!.on('data', (d) => (err += String(d)));
    proc.on('exit', (code) => reject(new Error(`explore exited (${code}) before printing its address: ${err}`)));
  });
}

/** A raw request: the path goes on the request line exactly as given (no normalisation of "..", no encoding). */
function rawGet(port: number, path: string, opts: { method?: string; host?: string } = {}): Promise<{ status: number; body: string }> {
  return new Promise((resolve, reject) => {
    const req = request({ host: '127.0.0.1', port, path, method: opts.method ?? 'GET', headers: { host: opts.host ?? `127.0.0.1:${port}` } }, (res) => {
      let body = '';
      res.on('data', (d) => (body += String(d)));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, body }));
    });
    req.on('error', reject);
    req.end();
  });
}

type Window = {
  explorer: {
    renders: number;
    error: string | null;
    bf: Float32Array;
    df: Float32Array;
    width: number;
    height: number;
    lastMs: number;
    rockings: number;
    rocking: { thickness_nm: number; w: Float64Array; bf: Float64Array; df: Float64Array } | null;
  };
};

async function renders(page: Page): Promise<number> {
  return page.evaluate(() => (window as unknown as Window).explorer.renders);
}

/** Wait until the page has drawn a render newer than `after`; fail on a page-side error. */
async function waitRender(page: Page, after: number): Promise<void> {
  await page.waitForFunction((n) => {
    const e = (window as unknown as Window).explorer;
    return e.error !== null || e.renders > n;
  }, after, { timeout: 60_000 });
  const error = await page.evaluate(() => (window as unknown as Window).explorer.error);
  expect(error).toBeNull();
}

async function images(page: Page): Promise<{ width: number; height: number; bf: number[]; df: number[] }> {
  return page.evaluate(() => {
    const e = (window as unknown as Window).explorer;
    return { width: e.width, height: e.height, bf: Array.from(e.bf), df: Array.from(e.df) };
  });
}

/** Set a slider (or other input) and fire the event the page listens to. */
async function setInput(page: Page, id: string, value: string, event: 'input' | 'change'): Promise<void> {
  await page.evaluate(([i, v, ev]) => {
    const el = document.getElementById(i) as HTMLInputElement | HTMLSelectElement;
    el.value = v;
    el.dispatchEvent(new Event(ev, { bubbles: true }));
  }, [id, value, event] as const);
}

function maxAbsDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  expect(a.length).toBe(b.length);
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i]));
  return m;
}

/** Wait until the page holds a rocking curve for the given thickness. */
async function rockingFor(page: Page, thickness_nm: number): Promise<{ w: number[]; bf: number[]; df: number[] }> {
  await page.waitForFunction((t) => (window as unknown as Window).explorer.rocking?.thickness_nm === t, thickness_nm, { timeout: 60_000 });
  return page.evaluate(() => {
    const r = (window as unknown as Window).explorer.rocking!;
    return { w: Array.from(r.w), bf: Array.from(r.bf), df: Array.from(r.df) };
  });
}

/**
 * Two-beam perfect crystal with absorption, closed form written here from the
 * slab matrix exp(pi i M t) with M = [[0, q], [q, 2 s]], q = 1/xi_g + i/xi'_g,
 * sigma = sqrt(s^2 + q^2), times exp(-pi t / xi'_0), xi'_0 = xi'_g (Hirsch et
 * al. 1965; physics.md): phi_0 = e(cos(pi sigma t) - i s sin(pi sigma t)/sigma),
 * phi_g = e i q sin(pi sigma t)/sigma. Complex arithmetic by hand.
 */
function twoBeamClosedForm(w: number, xi: number, xiAbs: number, t: number): { bf: number; df: number } {
  type C = [number, number];
  const mul = (a: C, b: C): C => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
  const div = (a: C, b: C): C => {
    const d = b[0] * b[0] + b[1] * b[1];
    return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
  };
  const sqrt = (a: C): C => {
    const r = Math.hypot(a[0], a[1]);
    const re = Math.sqrt((r + a[0]) / 2);
    const im = Math.sign(a[1] || 1) * Math.sqrt(Math.max(0, (r - a[0]) / 2));
    return [re, im];
  };
  const cos = (a: C): C => [Math.cos(a[0]) * Math.cosh(a[1]), -Math.sin(a[0]) * Math.sinh(a[1])];
  const sin = (a: C): C => [Math.sin(a[0]) * Math.cosh(a[1]), Math.cos(a[0]) * Math.sinh(a[1])];
  const s = w / xi;
  const q: C = [1 / xi, 1 / xiAbs];
  const q2 = mul(q, q);
  const sigma = sqrt([s * s + q2[0], q2[1]]);
  const arg: C = [Math.PI * sigma[0] * t, Math.PI * sigma[1] * t];
  const sn = div(sin(arg), sigma);
  const e = Math.exp((-Math.PI * t) / xiAbs);
  const phi0: C = [e * (cos(arg)[0] + s * sn[1]), e * (cos(arg)[1] - s * sn[0])];
  const iq: C = [-q[1], q[0]];
  const phig = mul(iq, sn).map((x) => e * x) as C;
  return { bf: phi0[0] ** 2 + phi0[1] ** 2, df: phig[0] ** 2 + phig[1] ** 2 };
}

function checkRocking(r: { w: number[]; bf: number[]; df: number[] }, xi: number, xiAbs: number, t: number): void {
  expect(r.w.length).toBeGreaterThan(100);
  expect(Math.min(...r.w)).toBeLessThanOrEqual(-4);
  expect(Math.max(...r.w)).toBeGreaterThanOrEqual(4);
  for (let i = 0; i < r.w.length; i++) {
    const c = twoBeamClosedForm(r.w[i], xi, xiAbs, t);
    // exact slab matrices in both: agreement to rounding
    expect(Math.abs(r.bf[i] - c.bf)).toBeLessThan(1e-9);
    expect(Math.abs(r.df[i] - c.df)).toBeLessThan(1e-9);
  }
}

function cliRender(file: string, out: string, id: string): { bf: Float32Array; df: Float32Array; width: number; height: number } {
  // the page integrates every column on its own; the CLI's shared columns agree only to the integrator tolerance (1e-4)
  const r = spawnSync(process.execPath, [CLI, 'render', file, '--out', out, '--json', '--each-column'], { cwd: ROOT, encoding: 'utf8' });
  expect(r.stderr).toBe('');
  expect(r.status).toBe(0);
  const bf = readFloatTiff(join(out, `${id}-bf.tif`));
  const df = readFloatTiff(join(out, `${id}-df.tif`));
  return { bf: bf.data, df: df.data, width: bf.width, height: bf.height };
}

describe('thinfoil explore server (no browser needed)', () => {
  let dir: string;
  let file: string;
  let served: Served;

  beforeAll(async () => {
    if (!existsSync(CLI)) throw new Error('dist/cli/main.js is missing: run `npm run build` (npm test does it)');
    dir = mkdtempSync(join(tmpdir(), 'thinfoil-explore-server-'));
    file = join(dir, 'foil.json');
    writeFileSync(file, JSON.stringify(SCENARIO, null, 2));
    served = await serve(file);
  });

  afterAll(() => {
    if (served && served.proc.exitCode === null) served.proc.kill('SIGKILL');
  });

  it('serves the page files and the scenario, and 404 for everything else (traversal, absolute paths, other hosts, other methods)', async () => {
    for (const p of ['/', '/index.html', '/app.js', '/worker.js', '/rocking.js', '/style.css', '/scenario.json', '/app.js?v=1']) {
      expect((await rawGet(served.port, p)).status, p).toBe(200);
    }
    const served_ = await rawGet(served.port, '/scenario.json');
    expect(JSON.parse(served_.body)).toEqual(SCENARIO);
    const refused = [
      '/../package.json',
      '/../../package.json',
      '/%2e%2e/package.json',
      '/%2E%2E%2Fpackage.json',
      '/..%2fpackage.json',
      '/.%2e/.%2e/etc/passwd',
      '//etc/passwd',
      '/etc/passwd',
      file,
      `/${file}`,
      '/dist/cli/main.js',
      '/explorer/app.ts',
      '/page/app.js',
      '/index.html/../package.json',
      '/app.js/',
      '/APP.JS',
      '/foil.json',
      `http://127.0.0.1:${served.port}/../package.json`,
      `http://127.0.0.1:${served.port}/index.html`,
      '/favicon.ico',
      '*',
    ];
    for (const p of refused) {
      const r = await rawGet(served.port, p);
      expect(r.status, p).toBe(404);
      expect(r.body).toBe('not found\n');
    }
    expect((await rawGet(served.port, '/', { method: 'POST' })).status).toBe(404);
    expect((await rawGet(served.port, '/scenario.json', { method: 'PUT' })).status).toBe(404);
    expect((await rawGet(served.port, '/', { host: 'example.com' })).status).toBe(404);
    expect(readFileSync(file, 'utf8')).toBe(JSON.stringify(SCENARIO, null, 2));
  });

  it('stops on Ctrl-C (SIGINT) with exit code 0', async () => {
    const exited = new Promise<number | null>((resolve) => served.proc.on('exit', (code) => resolve(code)));
    served.proc.kill('SIGINT');
    expect(await exited).toBe(0);
    // No check that the port refuses connections afterwards: files run side by side (vitest.config.ts), so another
    // test's server may already have been given the freed port (seen once: 'socket hang up' instead of ECONNREFUSED).
  });

});

const SUITE = HAVE_CHROMIUM ? 'thinfoil explore in chromium' : `thinfoil explore in chromium (SKIPPED: ${CHROMIUM} not found; install Debian's chromium package)`;

describe.skipIf(!HAVE_CHROMIUM)(SUITE, () => {
  let dir: string;
  let file: string;
  let served: Served;
  let ctx: BrowserContext;
  let page: Page;
  const consoleErrors: string[] = [];

  beforeAll(async () => {
    if (!existsSync(CLI) || !existsSync(join(ROOT, 'dist', 'explorer', 'page', 'app.js'))) {
      throw new Error('dist/ or the explorer bundle is missing: run `npm run build` (npm test does it)');
    }
    const { chromium } = await import('playwright-core');
    dir = mkdtempSync(join(tmpdir(), 'thinfoil-explore-'));
    file = join(dir, 'foil.json');
    writeFileSync(file, JSON.stringify(SCENARIO, null, 2));
    served = await serve(file);
    ctx = await chromium.launchPersistentContext(mkdtempSync(join(tmpdir(), 'thinfoil-chromium-')), {
      executablePath: CHROMIUM,
      headless: true,
      args: LAUNCH_ARGS,
      acceptDownloads: true,
      viewport: { width: 1060, height: 680 },
    });
    page = await ctx.newPage();
    page.on('console', (m) => {
      if (m.type() === 'error') consoleErrors.push(m.text());
    });
    page.on('pageerror', (e) => consoleErrors.push(e.message));
  });

  afterAll(async () => {
    await ctx?.close();
    if (served && served.proc.exitCode === null) served.proc.kill('SIGKILL');
  });

  it('loads without console errors and shows both fields', async () => {
    await page.goto(served.url);
    await waitRender(page, 0);
    expect(consoleErrors).toEqual([]);
    const img = await images(page);
    expect([img.width, img.height]).toEqual([40, 32]);
    expect(img.bf.every(Number.isFinite) && img.df.every(Number.isFinite)).toBe(true);
    expect(await page.locator('#reflection option').count()).toBeGreaterThan(4);
    expect(await page.locator('#reflection option:checked').textContent()).toMatch(/^2 0 0 +\(xi_g [0-9.]+ nm\)$/);
    // the rocking curve against the closed form (xi_g, xi'_g from `thinfoil reflection`)
    const refl = spawnSync(process.execPath, [CLI, 'reflection', 'Cu', '2,0,0', '--kv', '200', '--absorption', '0.1', '--json'], { cwd: ROOT, encoding: 'utf8' });
    const { xi_nm, xiAbs_nm } = JSON.parse(refl.stdout) as { xi_nm: number; xiAbs_nm: number };
    checkRocking(await rockingFor(page, 60), xi_nm, xiAbs_nm, 60);
    // nothing changed yet: "save" gives back the served scenario
    const [download] = await Promise.all([page.waitForEvent('download'), page.click('#save')]);
    const untouched = join(dir, 'untouched.json');
    await download.saveAs(untouched);
    expect(JSON.parse(readFileSync(untouched, 'utf8'))).toEqual(SCENARIO);
  });

  it('moving the w control changes the image', async () => {
    const before = await images(page);
    const n = await renders(page);
    await setInput(page, 'deviation', '1.2', 'input');
    await waitRender(page, n);
    const after = await images(page);
    expect(maxAbsDiff(before.bf, after.bf)).toBeGreaterThan(1e-3);
    expect(consoleErrors).toEqual([]);
  });

  it('shows for changed settings the same floats as the CLI, and the saved scenario renders with the CLI to the same image', async () => {
    // thickness 70 nm, depth 25 nm, another Burgers vector, the reflection -2 0 0
    for (const [id, v] of [['thickness-value', '70'], ['depth-value', '25']] as const) {
      const n = await renders(page);
      await setInput(page, id, v, 'change');
      await waitRender(page, n);
    }
    // the rocking curve follows the thickness
    const refl = JSON.parse(spawnSync(process.execPath, [CLI, 'reflection', 'Cu', '2,0,0', '--absorption', '0.1', '--json'], { cwd: ROOT, encoding: 'utf8' }).stdout) as { xi_nm: number; xiAbs_nm: number };
    checkRocking(await rockingFor(page, 70), refl.xi_nm, refl.xiAbs_nm, 70);
    const bText = await page.locator('#burgers option[value="2"]').textContent();
    let n = await renders(page);
    await setInput(page, 'burgers', '2', 'change');
    await waitRender(page, n);
    const gIndex = await page.evaluate(() => Array.from((document.getElementById('reflection') as HTMLSelectElement).options).findIndex((o: { text: string }) => o.text.startsWith('-2 0 0 ')));
    expect(gIndex).toBeGreaterThanOrEqual(0);
    n = await renders(page);
    await setInput(page, 'reflection', String(gIndex), 'change');
    await waitRender(page, n);
    const shown = await images(page);

    // the same settings written by the test itself into a scenario for the CLI
    const expected = structuredClone(SCENARIO) as typeof SCENARIO & { conditions: Record<string, unknown>[] };
    expected.foil.thickness_nm = 70;
    expected.defects[0].point_nm = [2, -3, 25];
    expected.defects[0].b = String(bText).replace(/^b = /, '');
    expected.conditions = [{ id: 'g200', g: [-2, 0, 0], w: 1.2 }];
    const mine = join(dir, 'expected.json');
    writeFileSync(mine, JSON.stringify(expected));
    const cli = cliRender(mine, join(dir, 'cli-expected'), 'g200');
    expect([cli.width, cli.height]).toEqual([shown.width, shown.height]);
    expect(maxAbsDiff(shown.bf, cli.bf)).toBeLessThanOrEqual(1e-6);
    expect(maxAbsDiff(shown.df, cli.df)).toBeLessThanOrEqual(1e-6);

    // "save": a scenario file the CLI accepts and renders to the image shown
    const [download] = await Promise.all([page.waitForEvent('download'), page.click('#save')]);
    const savedPath = join(dir, 'saved.json');
    await download.saveAs(savedPath);
    const saved = JSON.parse(readFileSync(savedPath, 'utf8'));
    expect(saved.conditions[0]).toEqual({ id: 'g200', g: [-2, 0, 0], w: 1.2 });
    expect(saved.foil.thickness_nm).toBe(70);
    expect(saved.defects[0].point_nm).toEqual([2, -3, 25]);
    expect(saved.conditions[1]).toEqual(SCENARIO.conditions[1]);
    const fromSaved = cliRender(savedPath, join(dir, 'cli-saved'), 'g200');
    expect(maxAbsDiff(shown.bf, fromSaved.bf)).toBeLessThanOrEqual(1e-6);
    expect(maxAbsDiff(shown.df, fromSaved.df)).toBeLessThanOrEqual(1e-6);
    expect(consoleErrors).toEqual([]);
  });

  it('a 3-beam systematic row in the page equals the CLI render', async () => {
    const n = await renders(page);
    await setInput(page, 'beams', '3', 'change');
    await waitRender(page, n);
    const shown = await images(page);
    const [download] = await Promise.all([page.waitForEvent('download'), page.click('#save')]);
    const savedPath = join(dir, 'saved-row.json');
    await download.saveAs(savedPath);
    expect(JSON.parse(readFileSync(savedPath, 'utf8')).conditions[0].beams).toEqual({ row: 3 });
    const cli = cliRender(savedPath, join(dir, 'cli-row'), 'g200');
    expect(maxAbsDiff(shown.bf, cli.bf)).toBeLessThanOrEqual(1e-6);
    expect(maxAbsDiff(shown.df, cli.df)).toBeLessThanOrEqual(1e-6);
  });

  it('"foil surfaces: infinite medium" in the page equals the CLI render of the saved scenario, and differs from relaxed', async () => {
    const relaxed = await images(page);
    const note = () => page.evaluate(() => document.getElementById('model-note')!.textContent);
    // the page says what the images are (the scenario has Cu's Cij and no "surfaces": the defaults)
    expect(await note()).toMatch(/anisotropic elasticity, relaxed foil surfaces\): a model, not a measurement/);
    const n = await renders(page);
    await setInput(page, 'surfaces', 'infinite', 'change');
    await waitRender(page, n);
    expect(await note()).toMatch(/anisotropic elasticity, infinite medium\)/);
    const shown = await images(page);
    const [download] = await Promise.all([page.waitForEvent('download'), page.click('#save')]);
    const savedPath = join(dir, 'saved-infinite.json');
    await download.saveAs(savedPath);
    expect(JSON.parse(readFileSync(savedPath, 'utf8')).surfaces).toBe('infinite');
    const cli = cliRender(savedPath, join(dir, 'cli-infinite'), 'g200');
    expect(maxAbsDiff(shown.bf, cli.bf)).toBeLessThanOrEqual(1e-6);
    expect(maxAbsDiff(shown.df, cli.df)).toBeLessThanOrEqual(1e-6);
    // the scenario's inclined line with and without the surface corrections
    expect(maxAbsDiff(shown.bf, relaxed.bf)).toBeGreaterThan(1e-3);
    const m = await renders(page);
    await setInput(page, 'surfaces', 'relaxed', 'change');
    await waitRender(page, m);
  });

  it('exports the figure as PNG and SVG', async () => {
    const [png] = await Promise.all([page.waitForEvent('download'), page.click('#export-png')]);
    const pngPath = join(dir, 'figure.png');
    await png.saveAs(pngPath);
    const head = readFileSync(pngPath);
    expect(head.subarray(0, 8)).toEqual(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]));
    const canvas = await page.evaluate(() => [(document.getElementById('figure') as HTMLCanvasElement).width, (document.getElementById('figure') as HTMLCanvasElement).height]);
    expect([head.readUInt32BE(16), head.readUInt32BE(20)]).toEqual(canvas);
    const [svg] = await Promise.all([page.waitForEvent('download'), page.click('#export-svg')]);
    const svgPath = join(dir, 'figure.svg');
    await svg.saveAs(svgPath);
    const text = readFileSync(svgPath, 'utf8');
    expect(text).toMatch(/^<svg xmlns="http:\/\/www.w3.org\/2000\/svg" width="\d+" height="\d+"/);
    expect((text.match(/<image /g) ?? []).length).toBe(2);
    expect(text).toContain('bright field');
    expect(text).toContain('dark field');
    expect(consoleErrors).toEqual([]);
  });

  it.runIf(SCREENSHOT)('writes the README screenshot (docs/explorer.png) of scenarios/copper-dislocations.json', async () => {
    const example = join(dir, 'example.json');
    copyFileSync(join(ROOT, 'scenarios', 'copper-dislocations.json'), example);
    const s = await serve(example);
    try {
      const p = await ctx.newPage();
      await p.goto(s.url);
      await waitRender(p, 0);
      await p.waitForFunction(() => (window as unknown as Window).explorer.rockings > 0, null, { timeout: 60_000 });
      await p.screenshot({ path: join(ROOT, 'docs', 'explorer.png') });
    } finally {
      s.proc.kill('SIGINT');
    }
  });
});

describe('thinfoil explore refuses bad input before serving anything', () => {
  function run(...args: string[]) {
    const r = spawnSync(process.execPath, [CLI, 'explore', ...args], { cwd: ROOT, encoding: 'utf8', timeout: 20_000 });
    return { code: r.status, out: r.stdout, err: r.stderr };
  }
  it('a missing file, a scenario the parser refuses and a bad --port: one sentence, exit code 2, nothing served', () => {
    const dir = mkdtempSync(join(tmpdir(), 'thinfoil-explore-bad-'));
    const bad = join(dir, 'bad.json');
    writeFileSync(bad, JSON.stringify({ ...SCENARIO, foil: { thickness_nm: -5 } }));
    const cases: [string[], RegExp][] = [
      [[join(dir, 'nope.json')], /cannot be read/],
      [[bad], /foil\.thickness_nm/],
      [[join(ROOT, 'scenarios', 'copper-dislocations.json'), '--port', 'eighty'], /--port eighty/],
    ];
    for (const [args, msg] of cases) {
      const r = run(...args);
      expect(r.code, r.err).toBe(2);
      expect(r.err).toMatch(msg);
      expect(r.err).not.toMatch(/\n\s+at /);
      expect(r.out).toBe('');
    }
  });
});
