/**
 * The validated scenario: one foil of one material, its defects and the
 * imaging conditions. Vectors are in lattice units (3-index; hexagonal input
 * in 4 indices is converted on reading). Positions are in nm.
 */
import type { Vec3 } from '../math/vec3.js';
import type { Material } from '../crystal/material.js';
import type { AbsorptionSetting } from '../scattering/absorption.js';
import type { DefectSpec } from '../defects/registry.js';

export type BeamSet =
  | { readonly kind: 'two' }
  /** Systematic row n g for n = nMin..nMax (nMin <= 0 < nMax). */
  | { readonly kind: 'row'; readonly nMin: number; readonly nMax: number }
  /** Any set of beams (plane indices); 000 and g are always included. */
  | { readonly kind: 'set'; readonly beams: readonly Vec3[] };

/** Number of beams of a set, 000 included (a set's `beams` already holds g). */
export function beamCount(b: BeamSet): number {
  return b.kind === 'two' ? 2 : b.kind === 'row' ? b.nMax - b.nMin + 1 : b.beams.length + 1;
}

export interface Condition {
  readonly id: string;
  /** Reflection g (plane indices, 3-index). */
  readonly g: Vec3;
  /** Deviation of g: given directly, as w = s xi_g, or by the weak-beam condition g(ng). */
  readonly deviation: Deviation;
  /** Beam direction for this condition (crystal direction). */
  readonly beam: Vec3;
  readonly beams: BeamSet;
}

export type Deviation =
  | { readonly kind: 's'; readonly s_per_nm: number }
  | { readonly kind: 'w'; readonly w: number }
  /** Ewald sphere through n g: s_g = (n - 1) lambda g^2 / 2. */
  | { readonly kind: 'weakBeam'; readonly n: number };

// each defect type's spec lives in its module (src/defects/<type>.ts); the union in src/defects/registry.ts
export type { DefectSpec };
export type { DislocationSpec } from '../defects/dislocation.js';
export type { PartialSpec } from '../defects/partial.js';
export type { DissociatedSpec } from '../defects/dissociated.js';
export type { FaultSpec } from '../defects/fault.js';
export type { InclusionSpec } from '../defects/inclusion.js';
export type { LoopSpec } from '../defects/loop.js';

export interface CandidateSpec {
  readonly label: string;
  readonly b: Vec3;
  /** Optional line direction; otherwise each defect's own line is used. */
  readonly line?: Vec3;
}

export interface ImageSpec {
  readonly width_px: number;
  readonly height_px: number;
  readonly pixel_nm: number;
}

export type Elasticity = 'anisotropic' | 'isotropic';

/** Foil surfaces: "relaxed" (free-surface corrections of straight lines and inclusions, the default) or "infinite" (infinite-medium fields). */
export type Surfaces = 'relaxed' | 'infinite';

export interface Scenario {
  readonly name: string;
  readonly material: Material;
  readonly kV: number;
  readonly thickness_nm: number;
  /** Foil normal as a crystal direction. */
  readonly foilNormal: Vec3;
  /** Reference beam direction (defines the frame in which defect points are given). */
  readonly beam: Vec3;
  /** Cartesian unit vector (crystal frame) drawn along +x, before projection perpendicular to the beam. */
  readonly imageX_cart: Vec3;
  readonly image: ImageSpec;
  /** "thermal-diffuse" (absorption per beam from the Debye-Waller factors, the default) or a constant ratio xi_g / xi'_g. */
  readonly absorption: AbsorptionSetting;
  /**
   * Elastic solution for straight dislocations (and partials, ribbons):
   * "anisotropic" (Stroh, from the material's Cij; the default) or
   * "isotropic" (Hirth & Lothe closed form with the Voigt-Reuss-Hill G, nu).
   */
  readonly elasticity: Elasticity;
  /**
   * Free-surface relaxation of straight dislocation fields (src/elasticity/surfaceRelaxation.ts):
   * "relaxed" (the default) adds a surface correction to every straight line and to every inclusion wholly
   * inside the foil (see README, Foil surfaces, for what is exact and what is approximated; loops are not
   * relaxed); "infinite" uses the infinite-medium fields.
   */
  readonly surfaces: Surfaces;
  readonly conditions: readonly Condition[];
  readonly defects: readonly DefectSpec[];
  readonly candidates: readonly CandidateSpec[];
}

/** Largest image the program will render, in pixels (memory guard: 4 float images of this size are ~ 64 MiB). */
export const MAX_PIXELS = 2048 * 2048;
export const MAX_SIDE_PX = 4096;
