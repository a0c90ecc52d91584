import { judge } from './visibility.js';
import { directionToCartesian } from '../crystal/lattice.js';
import { shockleySplit } from '../elasticity/dissociation.js';
export function visibilityTable(sc) {
    const rows = [];
    const l = sc.material.lattice;
    const make = (subject, kind, b, line) => ({
        subject,
        kind,
        b,
        ...(line ? { line } : {}),
        entries: sc.conditions.map((c) => ({ condition: c.id, g: c.g, ...judge(l, c.g, b, line) })),
    });
    const lines = [];
    for (const d of sc.defects) {
        if (d.type === 'dislocation' || d.type === 'partial') {
            rows.push(make(d.label, 'defect', d.b, d.line));
            lines.push(d.line);
        }
        else if (d.type === 'dissociated') {
            rows.push(make(`${d.label} (perfect b)`, 'defect', d.b, d.line));
            const pair = shockleySplit({ lattice: l, b: d.b, planeNormal: d.plane, lineCartesian: directionToCartesian(l, d.line) });
            rows.push(make(`${d.label}, partial 1`, 'defect', pair.b1, d.line));
            rows.push(make(`${d.label}, partial 2`, 'defect', pair.b2, d.line));
            lines.push(d.line);
        }
    }
    const soleLine = lines.length === 1 ? lines[0] : undefined;
    for (const c of sc.candidates)
        rows.push(make(c.label, 'candidate', c.b, c.line ?? soleLine));
    return rows;
}
