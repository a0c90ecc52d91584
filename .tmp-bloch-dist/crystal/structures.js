const H = 0.5;
const Q = 0.25;
const FCC = [
    [0, 0, 0],
    [0, H, H],
    [H, 0, H],
    [H, H, 0],
];
const shift = (ps, d) => ps.map((p) => [frac(p[0] + d[0]), frac(p[1] + d[1]), frac(p[2] + d[2])]);
/** Reduce to [0, 1); the inputs here are exact binary fractions. */
function frac(x) {
    const f = x - Math.floor(x);
    return f === 1 ? 0 : f;
}
const TEMPLATES = {
    fcc: { label: 'fcc', system: 'cubic', description: 'face-centred cubic (Fm-3m)', roles: ['atom'], sublattices: [FCC] },
    bcc: {
        label: 'bcc',
        system: 'cubic',
        description: 'body-centred cubic (Im-3m)',
        roles: ['atom'],
        sublattices: [
            [
                [0, 0, 0],
                [H, H, H],
            ],
        ],
    },
    diamond: {
        label: 'diamond',
        system: 'cubic',
        description: 'diamond cubic (Fd-3m, origin at an atom)',
        roles: ['atom'],
        sublattices: [[...FCC, ...shift(FCC, [Q, Q, Q])]],
    },
    zincblende: {
        label: 'zincblende',
        system: 'cubic',
        description: 'zincblende (sphalerite, F-43m)',
        roles: ['cation', 'anion'],
        sublattices: [FCC, shift(FCC, [Q, Q, Q])],
    },
    hcp: {
        label: 'hcp',
        system: 'hexagonal',
        description: 'hexagonal close-packed (P6_3/mmc)',
        roles: ['atom'],
        sublattices: [
            [
                [1 / 3, 2 / 3, Q],
                [2 / 3, 1 / 3, 3 * Q],
            ],
        ],
    },
    B2: {
        label: 'B2',
        system: 'cubic',
        description: 'B2 (CsCl type, ordered AB, Pm-3m)',
        roles: ['A', 'B'],
        sublattices: [[[0, 0, 0]], [[H, H, H]]],
    },
    L1_2: {
        label: 'L1_2',
        system: 'cubic',
        description: 'L1_2 (Cu3Au type, ordered A3B, Pm-3m)',
        roles: ['A (face centres)', 'B (corner)'],
        sublattices: [
            [
                [0, H, H],
                [H, 0, H],
                [H, H, 0],
            ],
            [[0, 0, 0]],
        ],
    },
    rocksalt: {
        label: 'rocksalt',
        system: 'cubic',
        description: 'rocksalt (NaCl type, Fm-3m)',
        roles: ['cation', 'anion'],
        sublattices: [FCC, shift(FCC, [H, 0, 0])],
    },
};
export const STRUCTURE_LABELS = Object.keys(TEMPLATES);
export function isStructureLabel(s) {
    return Object.prototype.hasOwnProperty.call(TEMPLATES, s);
}
export function structureTemplate(label) {
    return TEMPLATES[label];
}
/**
 * Sites of a template: `elements[i]` occupies sublattice i (full occupancy),
 * with the Debye-Waller factor B (Angstrom^2) given per element symbol.
 * Throws RangeError on a wrong element count or a missing B (callers that
 * read user input validate first and throw InputError).
 */
export function structureSites(label, elements, debyeWaller_A2) {
    const t = TEMPLATES[label];
    if (elements.length !== t.roles.length) {
        throw new RangeError(`structure ${label} needs ${t.roles.length} element(s) (${t.roles.join(', ')}), got ${elements.length}`);
    }
    const sites = [];
    t.sublattices.forEach((positions, i) => {
        const element = elements[i];
        const B = debyeWaller_A2[element];
        if (B === undefined)
            throw new RangeError(`no Debye-Waller factor given for ${element}`);
        for (const position of positions)
            sites.push({ element, position, occupancy: 1, debyeWaller_A2: B });
    });
    return sites;
}
