/**
 * The built-in demo: an INVENTED scenario. "Tenalloy 7" is a made-up fcc
 * nickel-cobalt solid solution (80 at.% Ni, 20 at.% Co on every site); its
 * lattice parameter, Debye-Waller factor and elastic constants are plausible
 * values chosen for the demonstration, not measurements of a real alloy.
 */
export const DEMO_SCENARIO = {
  name: 'demo: dislocations, a fault ribbon, a particle and loops in an invented Ni-Co foil',
  description: 'Invented scenario for demonstration; the alloy, foil and defects are made up.',
  material: {
    name: 'Tenalloy 7 (invented)',
    description: 'invented fcc Ni-20Co solid solution for the demo; numbers are plausible, not measured',
    structure: 'custom',
    lattice: { system: 'cubic', a_nm: 0.353 },
    sites: [
      [0, 0, 0],
      [0, 0.5, 0.5],
      [0.5, 0, 0.5],
      [0.5, 0.5, 0],
    ].flatMap((position) => [
      { element: 'Ni', position, occupancy: 0.8, debyeWaller_A2: 0.4 },
      { element: 'Co', position, occupancy: 0.2, debyeWaller_A2: 0.4 },
    ]),
    elastic: { cij_GPa: { C11: 250, C12: 155, C44: 122 } },
    stackingFaultEnergy_mJ_per_m2: 15,
    sources: {
      lattice: 'invented for the demo',
      debyeWaller: 'invented for the demo',
      elastic: 'invented for the demo',
      stackingFault: 'invented for the demo',
    },
  },
  kV: 200,
  foil: { thickness_nm: 120, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  imageX: [1, 0, 0],
  // 128 nm field of view at 1 nm per pixel (`demo --size 256` gives 0.5 nm pixels, about 4x the render time)
  image: { width_px: 128, height_px: 128, pixel_nm: 1 },
  absorption: 0.1,
  conditions: [
    { id: 'g200', g: [2, 0, 0], w: 0.3 },
    { id: 'g020', g: [0, 2, 0], w: 0.3 },
    { id: 'g220', g: [2, 2, 0], w: 0.3 },
    { id: 'g2m20', g: [2, -2, 0], w: 0.3 },
    // weak-beam dark field g(3g) with the systematic row the program picks (-3g .. 5g: it must hold 3g and 4g)
    { id: 'g220-wb3', g: [2, 2, 0], weakBeam: 3, beams: 'row' },
  ],
  defects: [
    // 60-degree dislocations on {111}: b = 1/2[1 1 0] along [1 0 1] (plane (1 -1 -1)), b = 1/2[1 -1 0] along [0 1 1] (plane (1 1 -1))
    { type: 'dislocation', label: 'A (60 deg, on (1 -1 -1))', b: '1/2[1 1 0]', line: [1, 0, 1], point_nm: [0, -35, 60] },
    { type: 'dislocation', label: 'B (60 deg, on (1 1 -1))', b: '1/2[1 -1 0]', line: [0, 1, 1], point_nm: [35, 0, 60] },
    { type: 'dislocation', label: 'C (screw, parallel to foil)', b: '1/2[1 -1 0]', line: [1, -1, 0], point_nm: [-10, 50, 45] },
    { type: 'dissociated', label: 'D (dissociated screw)', b: '1/2[1 1 0]', plane: [1, -1, 1], line: [1, 1, 0], point_nm: [-40, 35, 60] },
    { type: 'inclusion', label: 'E (coherent particle)', centre_nm: [42, 38, 50], radius_nm: 6, misfit: 0.02 },
    // a small hexagonal Frank loop on (111), edges along <110> (vertices on the in-plane axes e1 = beam x n, e2 = n x e1):
    // b = +1/3[1 1 1] along the normal, a vacancy loop enclosing an intrinsic fault
    {
      type: 'loop',
      label: 'F (Frank loop, intrinsic fault)',
      b: '1/3[1 1 1]',
      normal: [1, 1, 1],
      centre_nm: [-25, -12, 60],
      vertices_nm: [[4, 0], [2, 3.464], [-2, 3.464], [-4, 0], [-2, -3.464], [2, -3.464]],
      fault: 'intrinsic',
    },
    // a perfect prismatic loop of radius 1.5 nm just below the entrance surface: a black-white dot
    { type: 'loop', label: 'H (small prismatic loop near the surface)', b: '1/2[1 1 0]', normal: [1, 1, 0], centre_nm: [-50, 8, 6], radius_nm: 1.5 },
  ],
  candidates: ['1/2<110>'],
};
