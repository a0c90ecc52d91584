/**
 * One interface for every defect type. Each type lives in its own module
 * (src/defects/<type>.ts) and is listed once in src/defects/registry.ts; the
 * scenario parser, the defect model of the renderer, identification, the
 * visibility table and the scenario warnings reach the type only through
 * this interface. Everything here runs at set-up time, never per column.
 */
import type { Vec3 } from '../math/vec3.js';
import type { Material } from '../crystal/material.js';
import type { Lattice } from '../crystal/lattice.js';
import type { ImageFrame } from '../geometry/frames.js';
import type { Condition, DefectSpec, Scenario } from '../scenario/types.js';
import type { FieldSpec, JumpSurface } from '../imaging/fieldSpecs.js';
import type { Candidate, VisibilityNote } from '../analysis/candidates.js';
import type { Simulation, VisibilityRow } from '../analysis/visibilityTable.js';

/** One "defects[i]" entry of the scenario JSON being read, with the shared field readers. */
export interface DefectEntry {
  /** The raw JSON object. */
  readonly o: Record<string, unknown>;
  /** JSON path of the entry ("defects[2]"). */
  readonly path: string;
  readonly material: Material;
  readonly thickness_nm: number;
  /** Beam direction of the scenario (crystal direction). */
  readonly beam: Vec3;
  /** JSON path of one field of the entry. */
  at(key: string): string;
  /** The given label, or "<kind> defects[i]". */
  label(kind: string): string;
  /** The optional core radius field. */
  core(): { core_nm?: number };
  /** The required, nonzero Burgers vector "b". */
  burgers(example: string): Vec3;
  /** An optional point (image x, y, depth; default: image centre at mid-depth). */
  point(key: string): Vec3;
  /** A required point (image x, y, depth). */
  requiredPoint(key: string, example: string): Vec3;
}

/** What the defect model of one defect is built from. */
export interface ModelContext {
  readonly sc: Scenario;
  /** Reference image frame (image x, y and depth to crystal Cartesian nm). */
  readonly ref: ImageFrame;
  readonly poissonRatio: number;
  /** Voigt stiffness for anisotropic elasticity, else undefined. */
  readonly stiffness_GPa: readonly number[] | undefined;
  /** Lattice direction to Cartesian (nm). */
  cart(d: Vec3): Vec3;
}

/** The field specs and jump surfaces a defect adds to the model (pushed in order). */
export interface ModelParts {
  readonly fields: FieldSpec[];
  readonly surfaces: JumpSurface[];
}

/** What the scenario warnings of one defect are judged against. */
export interface WarningContext {
  readonly sc: Scenario;
  readonly ref: ImageFrame;
  /** "defects[i] (label)". */
  readonly where: string;
  /** Half width and half height of the field of view (nm). */
  readonly halfWidth_nm: number;
  readonly halfHeight_nm: number;
}

/**
 * Makes one visibility-table row: the subject, its Burgers vector, its line
 * (rule of thumb and simulated strip need it) and what to simulate.
 */
export type RowMaker = (subject: string, b: Vec3, line: Vec3 | undefined, simulation: (() => Simulation) | undefined) => VisibilityRow;

export interface DefectType<S extends DefectSpec = DefectSpec> {
  /** The scenario's "type" string. */
  readonly type: S['type'];
  /** The JSON key of the defect's position (image x, y and depth), e.g. "point_nm". */
  readonly positionKey: string;
  /** The defect's position: image x, y from the image centre and depth below the entrance surface (nm). */
  position(d: S): Vec3;
  /** Validates the entry (every message names the JSON path and the fix) and returns the spec. */
  read(e: DefectEntry): S;
  /** Refuses (InputError) a defect that lies wholly outside the foil. */
  refuseOutsideFoil(d: S, path: string, m: Material, thickness_nm: number, foilNormal: Vec3): void;
  /** Adds the displacement fields and the jump surfaces (cuts, faults) of the defect, in crystal Cartesian nm. */
  model(d: S, ctx: ModelContext, out: ModelParts): void;
  /** Plain-language warnings (the defect outside the field of view, seen end-on or edge-on ...). */
  warnings(d: S, ctx: WarningContext): string[];
  /** The line direction (lattice units) when the defect is a straight line, else undefined. */
  line(d: S): Vec3 | undefined;
  /** Visibility-table rows of the defect (none for types without a Burgers vector). */
  visibilityRows(sc: Scenario, d: S, row: RowMaker): VisibilityRow[];
  /**
   * Identification candidates when this defect is the target; absent when
   * identification has none for the type.
   */
  candidates?(sc: Scenario, d: S, defectIndex: number): Candidate[];
  /** The g.b (or g.R) entry of one of this type's candidates under one condition. */
  visibilityNote(lattice: Lattice, c: Candidate, cond: Condition): VisibilityNote;
}
