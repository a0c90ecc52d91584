/**
 * Plain-language warnings about a valid scenario that will probably not show
 * what the user expects: a defect outside the foil, a dislocation seen end-on,
 * a fault seen edge-on. They do not stop a render.
 */
import { cross, dot, norm, unit } from '../math/vec3.js';
import { directionToCartesian, planeNormalToCartesian } from '../crystal/lattice.js';
import type { Scenario } from '../scenario/types.js';
import { referenceFrame } from '../imaging/scenarioFrame.js';

export function scenarioWarnings(sc: Scenario): string[] {
  const out: string[] = [];
  const l = sc.material.lattice;
  const ref = referenceFrame(sc);
  const t = sc.thickness_nm;
  sc.defects.forEach((d, i) => {
    const where = `defects[${i}] (${d.label})`;
    if (d.type === 'inclusion') {
      const z = d.centre_nm[2];
      if (z + d.radius_nm < 0 || z - d.radius_nm > t) out.push(`${where}: the inclusion lies outside the foil (depth ${z} nm, thickness ${t} nm); only its long-range strain reaches the foil`);
      return;
    }
    if (d.type === 'fault') {
      const n = unit(planeNormalToCartesian(l, d.plane));
      if (Math.abs(dot(n, ref.ez)) < 1e-6) out.push(`${where}: the fault plane contains the beam (seen edge-on), so it shows no fringes`);
      return;
    }
    const u = unit(directionToCartesian(l, d.line));
    if (norm(cross(u, ref.ez)) < 1e-6) out.push(`${where}: the line runs along the beam (seen end-on): the image shows only its strain field around a point`);
    // a line parallel to the surfaces outside the foil
    if (Math.abs(dot(u, ref.normal)) < 1e-9 && (d.point_nm[2] < 0 || d.point_nm[2] > t)) {
      out.push(`${where}: the line is parallel to the surfaces at depth ${d.point_nm[2]} nm, outside the ${t} nm foil`);
    }
  });
  return out;
}
