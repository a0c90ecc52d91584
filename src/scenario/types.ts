/**
 * The validated scenario: one foil of one material, its defects and the
 * imaging conditions. Vectors are in lattice units (3-index; hexagonal input
 * in 4 indices is converted on reading). Positions are in nm.
 */
import type { Vec3 } from '../math/vec3.js';
import type { Material } from '../crystal/material.js';
import type { AbsorptionSetting } from '../scattering/absorption.js';

export type BeamSet =
  | { readonly kind: 'two' }
  /** Systematic row n g for n = nMin..nMax (nMin <= 0 < nMax). */
  | { readonly kind: 'row'; readonly nMin: number; readonly nMax: number }
  /** Any set of beams (plane indices); 000 and g are always included. */
  | { readonly kind: 'set'; readonly beams: readonly Vec3[] };

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

export interface DislocationSpec {
  readonly type: 'dislocation';
  readonly label: string;
  /** Burgers vector, lattice units. */
  readonly b: Vec3;
  /** Line direction u, lattice units. */
  readonly line: Vec3;
  /** A point on the line: x, y from the image centre in the reference image frame, z depth below the entrance surface (nm). */
  readonly point_nm: Vec3;
  /** Core radius used to regularise the field (nm). */
  readonly core_nm?: number;
}

/** A planar fault crossing the whole foil. */
export interface FaultSpec {
  readonly type: 'fault';
  readonly label: string;
  /** Fault plane (plane indices). */
  readonly plane: Vec3;
  /**
   * Fault vector R_f, lattice units: the displacement of the crystal behind
   * the fault (the side the electrons reach second) relative to the crystal
   * in front of it.
   */
  readonly vector: Vec3;
  /** How the vector was given: "intrinsic", "extrinsic" or "vector". */
  readonly nature: 'intrinsic' | 'extrinsic' | 'vector';
  /** A point on the fault plane (image frame: x, y, depth). */
  readonly point_nm: Vec3;
}

/** A partial dislocation bounding a fault that runs from its line to the foil surfaces. */
export interface PartialSpec {
  readonly type: 'partial';
  readonly label: string;
  readonly b: Vec3;
  readonly line: Vec3;
  readonly point_nm: Vec3;
  /** Plane of the fault the partial bounds. */
  readonly faultPlane: Vec3;
  /** Crystal direction (projected into the fault plane, perpendicular to the line) from the line into the fault. */
  readonly faultSide: Vec3;
  readonly core_nm?: number;
}

/** A perfect fcc dislocation split into two Shockley partials with an intrinsic fault ribbon between them. */
export interface DissociatedSpec {
  readonly type: 'dissociated';
  readonly label: string;
  /** Perfect Burgers vector (a/2<110>). */
  readonly b: Vec3;
  /** Glide plane {111}. */
  readonly plane: Vec3;
  readonly line: Vec3;
  /** Midpoint between the partials (image frame). */
  readonly point_nm: Vec3;
  /** Partial separation; omitted: the isotropic equilibrium width from the stacking-fault energy. */
  readonly separation_nm?: number;
  readonly core_nm?: number;
}

/** A coherent spherical inclusion (Ashby & Brown 1963). */
export interface InclusionSpec {
  readonly type: 'inclusion';
  readonly label: string;
  /** Centre (image frame: x, y, depth). */
  readonly centre_nm: Vec3;
  readonly radius_nm: number;
  /** Constrained strain eps (given directly or from the misfit delta). */
  readonly strain: number;
  /** The misfit delta when given. */
  readonly misfit?: number;
}

export type DefectSpec = DislocationSpec | FaultSpec | PartialSpec | DissociatedSpec | InclusionSpec;

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
  readonly conditions: readonly Condition[];
  readonly defects: readonly DefectSpec[];
  readonly candidates: readonly CandidateSpec[];
}

/** Largest image the program will render, in pixels (memory guard: 4 float images of this size are ~ 64 MiB). */
export const MAX_PIXELS = 2048 * 2048;
export const MAX_SIDE_PX = 4096;
