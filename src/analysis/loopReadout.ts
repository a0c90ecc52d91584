/**
 * Read-outs of dislocation-loop images by simulation.
 *
 * (a) Inside-outside contrast. The image of a dislocation lies on the side of
 * its line where the lattice planes are bent back towards the Bragg
 * condition; for a loop that side is inside or outside its projected line,
 * and it changes sign with (g.b) s (Edington 1975; Williams & Carter 2009).
 * Reversing g (or s) moves the image from outside to inside, so a +g/-g pair
 * gives the sign of b relative to the loop's normal, and with the loop's
 * inclination its nature (vacancy or interstitial; for a shear loop, b in its
 * plane, the sign of b: natureOfBurgers of src/defects/loop.ts). We do not apply the rule
 * blindly: for each nature, at +g and at -g, the loop alone is simulated and
 * the dark-field intensity is sampled along the outward normal of the
 * projected loop line at every point of the outline; the side of the highest
 * peak of the averaged profile is the image side. Dark field, because its
 * image of a dislocation is a bright line for either sign of s (bright-field
 * images of s < 0 are weak and may be bright or dark).
 *
 * The rule in this project's bookkeeping (derived in DEVELOPERS.md, Loops):
 * with b FS/RH about the line running counterclockwise about the loop normal
 * n (src/defects/loop.ts) and B the beam direction (into the foil), the image
 * lies outside when (g.b) s (n.B) > 0 and inside when it is < 0. It is
 * printed beside the simulated reading, and test/analysis/loopReadout.test.ts
 * checks the two against each other.
 *
 * (b) Black-white contrast of small loops (Rühle 1967; Wilkens 1970; common
 * practice in the analysis of small radiation-damage loops): a loop much
 * smaller than xi_g near a surface images as a bright and a dark lobe; the
 * black-white vector l (from the centroid of the dark lobe to that of the
 * bright lobe, here in dark field) lies roughly along +-g, and the sign of
 * l.g alternates with the loop's depth in layers of the order of xi_g / 2.
 * We report l at the loop's depth and its sign at a series of depths.
 */
import type { Vec3 } from '../math/vec3.js';
import { sig } from '../format.js';
import { add, dot, scale } from '../math/vec3.js';
import type { Condition, LoopSpec, Scenario } from '../scenario/types.js';
import { resolveCondition, type ResolvedCondition } from '../imaging/resolveCondition.js';
import { referenceFrame } from '../imaging/scenarioFrame.js';
import { imagePointToCrystal } from '../geometry/frames.js';
import { background, renderJob } from '../imaging/renderScenario.js';
import { columnEvaluator } from '../imaging/renderRows.js';
import { directionToCartesian } from '../crystal/lattice.js';
import { natureOfBurgers, type LoopNature } from '../defects/loop.js';
import { indicesWithFraction } from '../crystal/formatIndices.js';

export type Side = 'inside' | 'outside' | 'unclear' | 'no contrast';

export interface SideReading {
  readonly side: Side;
  /** Offset of the brightest dark-field line from the projected loop line, nm (> 0 outside). */
  readonly offset_nm: number;
  /** Mean dark-field I - background at that offset, fraction of the incident beam. */
  readonly contrast: number;
}

export interface BlackWhite {
  /** Black-white vector l in the image (nm, +x right, +y down), dark field. */
  readonly l_nm: readonly [number, number];
  /** Angle between l and the projected g (degrees, 0..180). */
  readonly angleToG_deg: number;
  /** Sign of l . g: +1, -1 (0 when there is no lobe contrast). */
  readonly sign: number;
}

export interface LoopNatureReading {
  readonly nature: LoopNature;
  /** The Burgers vector of this nature (lattice units): b or -b of the scenario's loop. */
  readonly b: Vec3;
  /** g . b at +g. */
  readonly gb: number;
  /** Image side at +g and at -g (same w). */
  readonly plus: SideReading;
  readonly minus: SideReading;
  /** What the rule says at +g: outside when (g.b) s (n.B) > 0 (see the file comment). */
  readonly rulePlus: 'inside' | 'outside' | 'undecided';
  /** Black-white vector at +g (small loops only). */
  readonly blackWhite?: BlackWhite;
  /** Sign of l . g at a series of depths (small loops only). */
  readonly depthSeries?: readonly { readonly depth_nm: number; readonly sign: number }[];
}

export interface LoopConditionReading {
  readonly loop: string;
  readonly condition: string;
  readonly g: Vec3;
  readonly w: number;
  readonly xi_nm: number;
  /** |n . beam|: 0 = edge-on, 1 = the loop plane normal to the beam. */
  readonly inclination: number;
  /** A note when inside-outside cannot be read (edge-on loop, beam set that cannot be reversed). */
  readonly note: string;
  readonly natures: readonly LoopNatureReading[];
  /** A loop under SMALL xi_g in radius: black-white lobes are read instead of the image side. */
  readonly small: boolean;
  /** What a +g/-g pair says (empty when the simulation gives no clear pair). */
  readonly pair: string;
}

/**
 * The inside-outside rule in this project's bookkeeping: the image of a loop
 * lies outside when (g.b) s (n.B) > 0 (b FS/RH about the line counterclockwise
 * about n; B the beam direction into the foil), inside when < 0.
 */
export function insideOutsideRule(gb: number, s_per_nm: number, nDotBeam: number): 'inside' | 'outside' | 'undecided' {
  const v = gb * s_per_nm * nDotBeam;
  return Math.abs(gb) < 1e-9 || s_per_nm === 0 || Math.abs(nDotBeam) < 1e-9 ? 'undecided' : v > 0 ? 'outside' : 'inside';
}

/**
 * Dark-field excess (fraction of the incident beam) below which a loop shows no image; where the
 * perfect-crystal dark field is itself weaker (a weak beam), an excess equal to that background counts.
 */
const MIN_CONTRAST = 0.01;
/** The image side is read only when its peak beats the other side's by this factor. */
const PEAK_MARGIN = 1.2;
/** Below this |n . beam| a loop is treated as edge-on: no inside or outside. */
const EDGE_ON = 0.2;
/** A loop is "small" (black-white analysis) when its radius is below this fraction of xi_g. */
const SMALL = 0.25;

function outline(d: LoopSpec): Vec3[] {
  const { e1, e2 } = d.frame;
  const r = d.radius_nm ?? 0;
  const pts: readonly (readonly [number, number])[] =
    d.vertices_nm ?? Array.from({ length: 64 }, (_, i) => [r * Math.cos((2 * Math.PI * i) / 64), r * Math.sin((2 * Math.PI * i) / 64)] as const);
  // densify a polygon to about 64 points along its perimeter
  const out: [number, number][] = [];
  const per = pts.map((p, i) => Math.hypot(pts[(i + 1) % pts.length][0] - p[0], pts[(i + 1) % pts.length][1] - p[1]));
  const total = per.reduce((a, b) => a + b, 0);
  for (let i = 0; i < pts.length; i++) {
    const a = pts[i];
    const b = pts[(i + 1) % pts.length];
    const k = Math.max(1, Math.round((64 * per[i]) / total));
    for (let j = 0; j < k; j++) out.push([a[0] + ((b[0] - a[0]) * j) / k, a[1] + ((b[1] - a[1]) * j) / k]);
  }
  return out.map(([a1, a2]) => add(scale(e1, a1), scale(e2, a2)));
}

function reversed(c: Condition): Condition {
  return { ...c, id: `${c.id} (-g)`, g: [-c.g[0], -c.g[1], -c.g[2]] as Vec3 };
}

/** One scenario holding only this loop (with Burgers vector b) and the one condition. */
function single(sc: Scenario, d: LoopSpec, b: Vec3, c: Condition, depth_nm?: number): Scenario {
  const loop: LoopSpec = { ...d, b, centre_nm: depth_nm === undefined ? d.centre_nm : [d.centre_nm[0], d.centre_nm[1], depth_nm] };
  return { ...sc, defects: [loop], conditions: [c] };
}

interface Evaluated {
  readonly rc: ResolvedCondition;
  /** Dark-field intensity minus background at an image point (nm, the condition's frame). */
  df(x: number, y: number): number;
  /** Perfect-crystal dark-field intensity (fraction of the incident beam). */
  readonly bg: number;
  /** The loop centre and outline projected into the condition's image (nm). */
  readonly centre: readonly [number, number];
  readonly line: readonly (readonly [number, number])[];
}

function evaluate(sc: Scenario, d: LoopSpec, b: Vec3, c: Condition, depth_nm?: number): Evaluated {
  const s1 = single(sc, d, b, c, depth_nm);
  const rc = resolveCondition(s1, c);
  const job = renderJob(s1, rc);
  const ev = columnEvaluator(job);
  const bg = background(job).df;
  const a = new Float64Array(4);
  const fr = rc.frame;
  const loop = s1.defects[0] as LoopSpec;
  const centre = imagePointToCrystal(referenceFrame(s1), loop.centre_nm);
  const proj = (p: Vec3): [number, number] => [dot(p, fr.ex), dot(p, fr.ey)];
  return {
    rc,
    bg,
    df(x, y) {
      ev.column(a, x, y);
      return a[2] * a[2] + a[3] * a[3] - bg;
    },
    centre: proj(centre),
    line: outline(loop).map((p) => proj(add(centre, p))),
  };
}

/**
 * The side of the image: the dark-field excess (I - background) sampled along the outward normal
 * of the projected outline at every outline point and averaged over the
 * outline; the image lies on the side of the profile's highest peak. The
 * columns within `exclude_nm` of the line (the core, where the column
 * approximation fails) are left out. The reading is "unclear" unless that
 * peak beats the best peak on the other side by PEAK_MARGIN.
 */
function sideOf(e: Evaluated, reach_nm: number, exclude_nm: number, points: number, samples: number): SideReading {
  const L = e.line.length > points ? e.line.filter((_, i) => i % Math.ceil(e.line.length / points) === 0) : e.line;
  const n = L.length;
  const profile = new Float64Array(2 * samples + 1);
  const h = reach_nm / samples;
  for (let k = 0; k < n; k++) {
    const p = L[k];
    const prev = L[(k + n - 1) % n];
    const next = L[(k + 1) % n];
    let nx = next[1] - prev[1];
    let ny = -(next[0] - prev[0]);
    const nl = Math.hypot(nx, ny);
    if (nl === 0) continue;
    nx /= nl;
    ny /= nl;
    // outward: away from the projected centre
    if (nx * (p[0] - e.centre[0]) + ny * (p[1] - e.centre[1]) < 0) {
      nx = -nx;
      ny = -ny;
    }
    for (let j = -samples; j <= samples; j++) {
      if (Math.abs(j * h) < exclude_nm) continue;
      profile[j + samples] += e.df(p[0] + j * h * nx, p[1] + j * h * ny) / n;
    }
  }
  const peak = (from: number, to: number) => {
    let best = from;
    for (let j = from; j <= to; j++) if (profile[j] > profile[best]) best = j;
    return best;
  };
  const inner = peak(0, samples - 1);
  const outer = peak(samples + 1, 2 * samples);
  const best = profile[outer] >= profile[inner] ? outer : inner;
  const other = best === outer ? inner : outer;
  let offset = (best - samples) * h;
  // parabolic refinement of the maximum
  if (best > 0 && best < profile.length - 1 && profile[best - 1] !== 0 && profile[best + 1] !== 0) {
    const y0 = profile[best - 1], y1 = profile[best], y2 = profile[best + 1];
    const den = y0 - 2 * y1 + y2;
    if (den < 0) offset += (0.5 * (y0 - y2) * h) / den;
  }
  const contrast = profile[best];
  const side: Side =
    contrast < Math.min(MIN_CONTRAST, e.bg) ? 'no contrast' : contrast < PEAK_MARGIN * Math.max(0, profile[other]) ? 'unclear' : offset > 0 ? 'outside' : 'inside';
  return { side, offset_nm: offset, contrast };
}

/** Black-white vector on a disc of radius `reach` about the projected centre (dark field). */
function blackWhite(e: Evaluated, reach_nm: number, half = 12): BlackWhite {
  const step = reach_nm / half;
  let wx = 0, wy = 0, ws = 0, bx = 0, by = 0, bs = 0;
  for (let j = -half; j <= half; j++) {
    for (let i = -half; i <= half; i++) {
      const x = i * step, y = j * step;
      if (x * x + y * y > reach_nm * reach_nm) continue;
      const v = e.df(e.centre[0] + x, e.centre[1] + y);
      if (v > 0) {
        wx += v * x; wy += v * y; ws += v;
      } else {
        bx -= v * x; by -= v * y; bs -= v;
      }
    }
  }
  const fr = e.rc.frame;
  const g: [number, number] = [dot(e.rc.g_cart, fr.ex), dot(e.rc.g_cart, fr.ey)];
  if (ws < 1e-9 || bs < 1e-9) return { l_nm: [0, 0], angleToG_deg: 90, sign: 0 };
  const l: [number, number] = [wx / ws - bx / bs, wy / ws - by / bs];
  const ll = Math.hypot(...l), gl = Math.hypot(...g);
  const cos = ll === 0 || gl === 0 ? 0 : (l[0] * g[0] + l[1] * g[1]) / (ll * gl);
  return { l_nm: l, angleToG_deg: (Math.acos(Math.max(-1, Math.min(1, cos))) * 180) / Math.PI, sign: Math.abs(cos) < 0.05 ? 0 : Math.sign(cos) };
}

function loopRadius(d: LoopSpec): number {
  return d.radius_nm ?? Math.max(...(d.vertices_nm ?? []).map(([a, b]) => Math.hypot(a, b)));
}

/** Reading settings: outline points, samples on each side of the line, depths of the black-white series. */
export interface LoopReadoutSettings {
  readonly outlinePoints: number;
  readonly samples: number;
  readonly depthSteps: number;
}

export const LOOP_READOUT_DEFAULTS: LoopReadoutSettings = { outlinePoints: 48, samples: 12, depthSteps: 12 };

/** `onStep(label)` is called before each loop and condition (for progress). */
export function analyseLoops(sc: Scenario, onStep?: (label: string) => void, settings: LoopReadoutSettings = LOOP_READOUT_DEFAULTS): LoopConditionReading[] {
  const out: LoopConditionReading[] = [];
  for (const d of sc.defects) {
    if (d.type !== 'loop') continue;
    const r = loopRadius(d);
    for (const c of sc.conditions) {
      onStep?.(`${d.label}, ${c.id}`);
      const rc = resolveCondition(sc, c);
      const n = d.frame.n;
      const nB = dot(n, rc.frame.ez);
      const inclination = Math.abs(nB);
      const small = r < SMALL * rc.xi_nm;
      const edgeOn = inclination < EDGE_ON;
      const reversible = c.beams.kind !== 'set';
      const note = small
        ? `small loop (radius under ${SMALL} xi_g): its image is not a line inside or outside it; read the black-white vector` +
          (Math.abs(rc.w) > 0.5 ? ` (black-white lobes are usually read near s = 0; at w = ${sig(rc.w, 2)} the depth layers are less regular)` : '')
        : edgeOn
          ? 'loop seen nearly edge-on: no inside or outside'
          : reversible
            ? ''
            : 'a beam set cannot be reversed with g: -g not simulated';
      const natures: LoopNatureReading[] = [];
      for (const b of [d.b, [-d.b[0], -d.b[1], -d.b[2]] as Vec3]) {
        const nature = natureOfBurgers(directionToCartesian(sc.material.lattice, b), n);
        const gb = dot(c.g, b);
        const rulePlus = insideOutsideRule(gb, rc.s_per_nm, nB);
        if (small) {
          // the lobes within a few radii, and at least xi_g / 8
          const disc = Math.max(3 * r, rc.xi_nm / 8);
          const series: { depth_nm: number; sign: number }[] = [];
          const t = sc.thickness_nm;
          const margin = r + 1;
          for (let k = 0; k < settings.depthSteps; k++) {
            const z = margin + ((t - 2 * margin) * (k + 0.5)) / settings.depthSteps;
            series.push({ depth_nm: z, sign: blackWhite(evaluate(sc, d, b, c, z), disc, 8).sign });
          }
          natures.push({ nature, b, gb, plus: none(), minus: none(), rulePlus, blackWhite: blackWhite(evaluate(sc, d, b, c), disc), depthSeries: series });
          continue;
        }
        // inside samples stay inside the projected loop (its minor semi-axis is r |n . beam|)
        const reach = Math.max(1, Math.min(0.8 * r * Math.max(inclination, EDGE_ON), rc.xi_nm / 3));
        // the core band (2 core radii, at least 0.5 nm) is left out of the profile
        const exclude = Math.max(0.5, 2 * (d.core_nm ?? bLength(sc, d.b)));
        const read = (cc: Condition) => sideOf(evaluate(sc, d, b, cc), reach, exclude, settings.outlinePoints, settings.samples);
        const plus = edgeOn ? none() : read(c);
        const minus = edgeOn || !reversible ? none() : read(reversed(c));
        natures.push({ nature, b, gb, plus, minus, rulePlus });
      }
      out.push({ loop: d.label, condition: c.id, g: c.g, w: rc.w, xi_nm: rc.xi_nm, inclination, note, small, natures, pair: pairKey(natures) });
    }
  }
  return out;
}

/**
 * What a +g/-g pair of micrographs says, from the simulated readings: one
 * sentence per nature when the two natures give different, clear pairs.
 */
function pairKey(natures: readonly LoopNatureReading[]): string {
  const clear = (x: SideReading) => x.side === 'inside' || x.side === 'outside';
  if (natures.length !== 2 || !natures.every((x) => clear(x.plus) && clear(x.minus))) return '';
  const [a, b] = natures;
  if (a.plus.side === b.plus.side || a.minus.side === b.minus.side) return '';
  // a shear loop (b in its plane) is neither vacancy nor interstitial: the pair tells the sign of b
  return natures.map((x) => `+g ${x.plus.side} and -g ${x.minus.side}: ${x.nature === 'shear' ? `shear loop with b = ${indicesWithFraction(x.b)}` : x.nature}`).join('; ');
}

function none(): SideReading {
  return { side: 'no contrast', offset_nm: 0, contrast: 0 };
}

function bLength(sc: Scenario, b: Vec3): number {
  const c = directionToCartesian(sc.material.lattice, b);
  return Math.hypot(c[0], c[1], c[2]);
}
