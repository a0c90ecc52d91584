/**
 * The pixel size of our float TIFFs as the scientific image programs read it:
 * checked with Debian's python3-tifffile (a general-purpose TIFF library that
 * reads and writes the ImageJ-family calibration: ResolutionUnit none,
 * X/YResolution in pixels per `unit`, "unit=nm" in the description), and the
 * same file written by tifffile read back by our own reader.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { encodeFloatTiff } from '../../src/output/tiff.js';
import { decodeTiff, descriptionUnit_nm } from '../../src/imageio/readTiff.js';
import { needPython, pythonText } from '../python.js';

const py = needPython('tifffile', 'numpy');
const TMP = fs.mkdtempSync(path.join(os.tmpdir(), 'thinfoil-tiffcal-'));

describe('calibrated TIFF read by python3-tifffile', () => {
  it('tifffile finds unit nm and a pixel size equal to the one written (0.37 nm, 2.5 nm)', (ctx) => {
    py.require(ctx);
    for (const p of [0.37, 2.5]) {
      const file = path.join(TMP, `cal-${p}.tif`);
      fs.writeFileSync(file, encodeFloatTiff(new Float32Array([1, 2, 3, 4, 5, 6]), 3, 2, { pixel_nm: p, description: 'g = (2 0 0), bright field' }));
      const out = pythonText([
        '-c',
        [
          'import sys, json, tifffile',
          't = tifffile.TiffFile(sys.argv[1])',
          'p = t.pages[0]',
          'xr = p.tags["XResolution"].value',
          'print(json.dumps({"ij": t.imagej_metadata, "x": xr[0] / xr[1], "unit": int(p.tags["ResolutionUnit"].value), "data": t.asarray().ravel().tolist()}))',
        ].join('\n'),
        file,
      ]);
      const r = JSON.parse(out) as { ij: Record<string, unknown>; x: number; unit: number; data: number[] };
      expect(r.ij.unit).toBe('nm');
      expect(r.unit).toBe(1);
      expect(1 / r.x).toBeCloseTo(p, 12);
      expect(r.data).toEqual([1, 2, 3, 4, 5, 6]);
    }
  });

  it('our reader takes the pixel size from a file that tifffile calibrated in micrometres', (ctx) => {
    py.require(ctx);
    const file = path.join(TMP, 'by-tifffile.tif');
    pythonText([
      '-c',
      'import sys, numpy as np, tifffile; tifffile.imwrite(sys.argv[1], np.arange(6, dtype=np.float32).reshape(2, 3), imagej=True, resolution=(1 / 0.0004, 1 / 0.0004), metadata={"unit": "um"})',
      file,
    ]);
    const img = decodeTiff(new Uint8Array(fs.readFileSync(file)), 'by-tifffile.tif');
    expect(img.pixel_nm).toBeCloseTo(0.4, 9); // 0.0004 um = 0.4 nm
  });
});

describe('description units', () => {
  it('knows nm, um, micron and angstrom, and nothing without the ImageJ marker', () => {
    expect(descriptionUnit_nm('ImageJ=1.11a\nunit=nm\n')).toBe(1);
    expect(descriptionUnit_nm('ImageJ=1.54f\nunit=micron\n')).toBe(1000);
    expect(descriptionUnit_nm('ImageJ=1.54f\nunit=um\n')).toBe(1000);
    expect(descriptionUnit_nm('ImageJ=1.54f\nunit=\u00c5\n')).toBe(0.1);
    expect(descriptionUnit_nm('unit=nm')).toBeUndefined();
    expect(descriptionUnit_nm('ImageJ=1.54f\nunit=pixel\n')).toBeUndefined();
  });
});
