/**
 * The identification part of the demo, INVENTED: one dislocation in a foil of
 * the invented demo alloy, imaged under four conditions; the demo hides one
 * Burgers vector of the 1/2<110> family, makes SYNTHETIC micrographs from it
 * (noise, blur, a background gradient, a random shift and rotation) and
 * identifies them. Nothing here is a measurement.
 */
import { DEMO_SCENARIO } from './demo.js';

export const DEMO_IDENTIFY_SCENARIO = {
  name: 'demo identification, dislocation X (synthetic micrographs)',
  description: 'Invented scenario; the micrographs are synthetic, made from a hidden candidate.',
  material: DEMO_SCENARIO.material,
  kV: 200,
  foil: { thickness_nm: 70, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  imageX: [1, 0, 0],
  image: { width_px: 64, height_px: 64, pixel_nm: 1 },
  absorption: 0.1,
  // infinite medium: with relaxed surfaces (the default) the whole demo took 176 instead of 37 CPU s (README,
  // Foil surfaces); the demo says so, and the synthetic micrographs are made with the same setting
  surfaces: 'infinite',
  conditions: [
    { id: 'g200', g: [2, 0, 0], w: 0.5 },
    { id: 'g020', g: [0, 2, 0], w: 0.5 },
    { id: 'g11m1', g: [1, 1, -1], w: 0.5, beam: [0, 1, 1] },
    { id: 'g1m11', g: [1, -1, 1], w: 0.5, beam: [0, 1, 1] },
  ],
  // b here is a placeholder: every candidate of the family replaces it (the hidden one is not written in this file)
  defects: [{ type: 'dislocation', label: 'X (b is replaced by each candidate)', b: '1/2[1 1 0]', line: [3, 1, 1], point_nm: [0, 0, 35] }],
  candidates: ['1/2<110>'],
};

/** The hidden truth (a signed member of the family) and how the synthetic micrographs are made. */
export const DEMO_HIDDEN_CANDIDATE = 'b = 1/2[0 -1 1]';
export const DEMO_MICROGRAPHS = [
  { conditionId: 'g200', field: 'bf' as const, gAngle_deg: 15 },
  { conditionId: 'g020', field: 'bf' as const, gAngle_deg: 105 },
  { conditionId: 'g11m1', field: 'df' as const, gAngle_deg: -40 },
  { conditionId: 'g1m11', field: 'bf' as const, gAngle_deg: 140 },
];
export const DEMO_SYNTHESIS = { width: 64, height: 64, pixel_nm: 1, snr: 5, blur_nm: 0.7, gradient: 0.1, maxShift_nm: 5, maxRotation_deg: 2, seed: 20261202 };
