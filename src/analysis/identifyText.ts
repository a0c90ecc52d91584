/**
 * Text of the numbers identification adds (fitted parameters, needed gaps,
 * noise), made once here so that the command line, the HTML report and the
 * figure print the same digits for the same number (the JSON carries the
 * numbers themselves).
 */
import { sig } from '../format.js';
import type { CandidateFitReport, FittedParameter, IdentifyResult } from './identify.js';
import type { MicrographNoise } from './identifyChecks.js';

/** "thickness 81.6 nm (stated 70, range 59.5 to 80.5)". */
export function parameterText(p: FittedParameter): string {
  const u = p.unit === '' ? '' : p.unit === 'degrees' ? ' deg' : ` ${p.unit}`;
  return `${p.name} ${sig(p.value, 3)}${u} (stated ${sig(p.nominal, 3)}, range ${sig(p.lo, 3)} to ${sig(p.hi, 3)}${p.from === 'measured' ? ', measured' : ''}${p.atLimit ? ', AT RANGE EDGE' : ''})`;
}

/** The fitted values of one candidate in one line. */
export function fitText(f: CandidateFitReport): string {
  const ps = f.parameters.filter((p) => !p.name.startsWith('line tilt')).map(parameterText);
  if (f.lineTilt_deg !== undefined) ps.push(`line tilted ${sig(f.lineTilt_deg, 2)} deg from the stated direction`);
  return `${ps.join('; ')}; score ${sig(f.nominalScore, 3)} as stated, ${sig(f.fittedScore, 3)} fitted${f.improved ? '' : ' (stated values kept)'}`;
}

export function gapText(x: number | undefined): string {
  return x === undefined ? '' : sig(x, 3);
}

/** "noise 0.163, residual 0.171, structure 1.57, unexplained 0.04". */
export function noiseText(p: MicrographNoise): string {
  return `noise ${sig(p.sigma, 3)}, residual ${sig(p.residualRms, 3)}, structure ${sig(p.structure, 3)}, unexplained ${sig(p.unexplained, 2)}`;
}

/** "structure 21.3 times the noise, 50 % of its structure unexplained" (the verdict's reason for one micrograph). */
export function structureText(p: Pick<MicrographNoise, 'structure' | 'unexplained'>): string {
  return `structure ${sig(p.structure, 3)} times the noise, ${sig(100 * p.unexplained, 2)} % of its structure unexplained`;
}

export function decisionWord(d: IdentifyResult['verdict']['decision']): string {
  return d === 'identified' ? 'IDENTIFIED' : d === 'cannot tell' ? 'CANNOT TELL' : 'NO CANDIDATE EXPLAINS';
}
