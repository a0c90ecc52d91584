import { dot } from '../math/vec3.js';
import { InputError } from '../errors.js';
import { formatVector } from '../scenario/parse.js';
import { judge } from './visibility.js';
/** The scenario with the candidate's defect in place of the target. */
export function variantScenario(sc, c) {
    return { ...sc, defects: sc.defects.map((d, i) => (i === c.defectIndex ? c.defect : d)) };
}
/** All candidates for the target defect. */
export function identificationCandidates(sc, defectIndex = 0) {
    if (sc.defects.length === 0)
        throw new InputError('defects is empty; identification needs the defect to identify (its line, position and depth) in "defects"');
    if (!(Number.isInteger(defectIndex) && defectIndex >= 0 && defectIndex < sc.defects.length)) {
        throw new InputError(`--defect ${defectIndex} names no defect; the scenario has defects 0..${sc.defects.length - 1}`);
    }
    const target = sc.defects[defectIndex];
    switch (target.type) {
        case 'dislocation':
        case 'partial':
            return burgersCandidates(sc, defectIndex, () => true);
        case 'dissociated': {
            const plane = target.plane;
            return burgersCandidates(sc, defectIndex, (b) => Math.abs(dot(plane, b)) < 1e-9);
        }
        case 'fault':
            return faultCandidates(target, defectIndex);
        case 'inclusion':
            return misfitCandidates(target, defectIndex);
        default: {
            // a defect type added later needs its own candidate kind here
            const t = target.type;
            throw new InputError(`defects[${defectIndex}] is a "${t}", for which identification has no candidates yet; choose another defect with --defect`);
        }
    }
}
function burgersCandidates(sc, defectIndex, keep) {
    const target = sc.defects[defectIndex];
    if (!('b' in target) || !('line' in target))
        throw new RangeError('burgersCandidates: target has no Burgers vector');
    if (sc.candidates.length === 0) {
        throw new InputError('candidates is empty; list the Burgers vectors to compare, e.g. "candidates": ["1/2<110>"]');
    }
    const out = [];
    const seen = new Set();
    for (const spec of sc.candidates) {
        for (const sign of [1, -1]) {
            const b = [sign * spec.b[0] + 0, sign * spec.b[1] + 0, sign * spec.b[2] + 0];
            if (!keep(b))
                continue;
            const line = spec.line ?? target.line;
            const key = `${formatVector(b)} ${formatVector(line)}`;
            if (seen.has(key))
                continue;
            seen.add(key);
            const label = spec.line === undefined ? `b = ${formatBurgers(b)}` : `b = ${formatBurgers(b)}, u = ${formatVector(line)}`;
            out.push({ label, kind: 'burgers', defectIndex, defect: { ...target, b, line }, b, line });
        }
    }
    if (out.length === 0) {
        throw new InputError(`candidates holds no Burgers vector that fits defects[${defectIndex}] (a dissociated dislocation needs b in its glide plane); add suitable candidates`);
    }
    return out;
}
function faultCandidates(target, defectIndex) {
    const v = target.vector;
    const minus = [-v[0] + 0, -v[1] + 0, -v[2] + 0];
    const name = (nature, r) => (nature === 'vector' ? `R = ${formatBurgers(r)}` : `${nature} (R = ${formatBurgers(r)})`);
    const other = target.nature === 'intrinsic' ? 'extrinsic' : target.nature === 'extrinsic' ? 'intrinsic' : 'vector';
    return [
        { label: name(target.nature, v), kind: 'faultNature', defectIndex, defect: target, faultVector: v },
        { label: name(other, minus), kind: 'faultNature', defectIndex, defect: { ...target, vector: minus, nature: other }, faultVector: minus },
    ];
}
function misfitCandidates(target, defectIndex) {
    const flip = (d) => (d.misfit === undefined ? { ...d, strain: -d.strain } : { ...d, strain: -d.strain, misfit: -d.misfit });
    const name = (d) => (d.misfit === undefined ? `strain ${signed(d.strain)}` : `misfit ${signed(d.misfit)}`);
    const positive = target.strain >= 0 ? target : flip(target);
    const negative = flip(positive);
    return [positive, negative].map((d) => ({ label: name(d), kind: 'misfitSign', defectIndex, defect: d, strain: d.strain }));
}
function signed(x) {
    return `${x >= 0 ? '+' : '-'}${Number(Math.abs(x).toPrecision(3))}`;
}
/** "1/2[1 1 0]" style for vectors whose entries share a simple fraction; else formatVector. */
export function formatBurgers(v) {
    for (const d of [1, 2, 3, 6, 4, 5, 8, 10, 12]) {
        const k = v.map((x) => x * d);
        if (k.every((x) => Math.abs(x - Math.round(x)) < 1e-6)) {
            const ints = k.map((x) => Math.round(x) + 0);
            return d === 1 ? `[${ints.join(' ')}]` : `1/${d}[${ints.join(' ')}]`;
        }
    }
    return formatVector(v);
}
/** The g.b (or g.R) entry of one candidate under one condition, with the rule of thumb's verdict. */
export function visibilityNote(lattice, c, cond) {
    if (c.kind === 'burgers' && c.b !== undefined) {
        const j = judge(lattice, cond.g, c.b, c.line);
        return { quantity: 'g.b', value: j.gb, ...(j.gbxu === undefined ? {} : { gbxu: j.gbxu }), verdict: j.verdict, rule: j.rule };
    }
    if (c.kind === 'faultNature' && c.faultVector !== undefined) {
        const gr = Math.round(dot(cond.g, c.faultVector) * 1e9) / 1e9 + 0;
        const frac = gr - Math.floor(gr);
        const invisible = frac < 1e-9 || frac > 1 - 1e-9;
        return {
            quantity: 'g.R',
            value: gr,
            verdict: invisible ? 'invisible' : 'visible',
            rule: invisible ? 'g.R integer: alpha = 2 pi g.R = 0 mod 2 pi' : `alpha = 2 pi g.R = ${Number((((frac * 360 + 180) % 360) - 180).toFixed(1))} degrees (mod 360)`,
        };
    }
    return { quantity: '' };
}
