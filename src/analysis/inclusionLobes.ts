/**
 * Misfit sign of a coherent spherical inclusion from its two-lobe image
 * (Ashby & Brown 1963): the image has a line of no contrast perpendicular to
 * g; which lobe (on the +g or the -g side) is dark depends on the sign of the
 * misfit, the depth and the imaging conditions. For each inclusion and
 * condition we simulate both signs and report which lobe is dark in bright
 * and dark field.
 */
import type { Vec3 } from '../math/vec3.js';
import { dot } from '../math/vec3.js';
import type { InclusionSpec, Scenario } from '../scenario/types.js';
import { resolveCondition } from '../imaging/resolveCondition.js';
import { referenceFrame } from '../imaging/scenarioFrame.js';
import { imagePointToCrystal } from '../geometry/frames.js';
import { background, renderJob } from '../imaging/renderScenario.js';
import { columnEvaluator } from '../imaging/renderRows.js';

export type Lobe = '+g side' | '-g side' | 'neither';

export interface LobeReading {
  readonly misfitSign: 'positive' | 'negative';
  readonly strain: number;
  /** Which lobe is the darker one in bright field and in dark field. */
  readonly bfDark: Lobe;
  readonly dfDark: Lobe;
  /** Mean I - background on the +g and -g sides (bright field). */
  readonly bfContrast: { readonly plus: number; readonly minus: number };
  readonly dfContrast: { readonly plus: number; readonly minus: number };
}

export interface InclusionConditionAnalysis {
  readonly inclusion: string;
  readonly condition: string;
  readonly g: Vec3;
  readonly readings: readonly LobeReading[];
}

/** `onStep(label)` is called before each inclusion and condition (for progress). */
export function analyseInclusions(sc: Scenario, gridHalf = 24, onStep?: (label: string) => void): InclusionConditionAnalysis[] {
  const out: InclusionConditionAnalysis[] = [];
  for (const d of sc.defects) {
    if (d.type !== 'inclusion') continue;
    for (const c of sc.conditions) {
      onStep?.(`${d.label}, ${c.id}`);
      const rc = resolveCondition(sc, c);
      const readings = ([1, -1] as const).map((sign) => lobes(sc, d, rc, sign * Math.abs(d.strain), gridHalf));
      out.push({ inclusion: d.label, condition: c.id, g: c.g, readings });
    }
  }
  return out;
}

function lobes(sc: Scenario, d: InclusionSpec, c: ReturnType<typeof resolveCondition>, strain: number, half: number): LobeReading {
  const centre = imagePointToCrystal(referenceFrame(sc), d.centre_nm);
  const fr = c.frame;
  const cx = dot(centre, fr.ex);
  const cy = dot(centre, fr.ey);
  const gx = dot(c.g_cart, fr.ex);
  const gy = dot(c.g_cart, fr.ey);
  const gl = Math.hypot(gx, gy);
  // window: a few radii, and at least a third of the extinction distance
  const R = Math.max(3 * d.radius_nm, c.xi_nm / 3);
  const step = R / half;
  // the scenario with this sphere alone at this misfit: its field as every render builds it (with the surface
  // correction when the scenario relaxes the surfaces)
  const job = renderJob({ ...sc, defects: [{ ...d, strain }] }, c);
  const ev = columnEvaluator(job);
  const a = new Float64Array(4);
  const { bf: bg0, df: bgg } = background(job);
  const sum = { bfP: 0, bfM: 0, dfP: 0, dfM: 0, nP: 0, nM: 0 };
  for (let j = -half; j <= half; j++) {
    for (let i = -half; i <= half; i++) {
      const x = i * step;
      const y = j * step;
      if (x * x + y * y > R * R) continue;
      const along = (x * gx + y * gy) / gl;
      if (Math.abs(along) < step / 2) continue;
      ev.column(a, cx + x, cy + y);
      const bf = a[0] ** 2 + a[1] ** 2 - bg0;
      const df = a[2] ** 2 + a[3] ** 2 - bgg;
      if (along > 0) {
        sum.bfP += bf;
        sum.dfP += df;
        sum.nP++;
      } else {
        sum.bfM += bf;
        sum.dfM += df;
        sum.nM++;
      }
    }
  }
  const bfc = { plus: sum.bfP / sum.nP, minus: sum.bfM / sum.nM };
  const dfc = { plus: sum.dfP / sum.nP, minus: sum.dfM / sum.nM };
  const darker = (p: number, m: number): Lobe => (Math.abs(p - m) < 1e-6 ? 'neither' : p < m ? '+g side' : '-g side');
  return {
    misfitSign: strain >= 0 ? 'positive' : 'negative',
    strain,
    bfDark: darker(bfc.plus, bfc.minus),
    dfDark: darker(dfc.plus, dfc.minus),
    bfContrast: bfc,
    dfContrast: dfc,
  };
}
