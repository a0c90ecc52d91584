/** Parsers for numeric command-line options: one clear sentence on bad input. */
import { InputError } from '../errors.js';
import { type AbsorptionSetting, THERMAL_DIFFUSE } from '../scattering/absorptionSetting.js';

export function numberOption(name: string, lo: number, hi: number, unit: string) {
  return (text: string): number => {
    const v = Number(text);
    // plain decimal numbers only (Number() would also take "0x10" or "0b1")
    if (!/^\s*[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?\s*$/.test(text) || !Number.isFinite(v)) throw new InputError(`${name}: "${text}" is not a number; give ${unit} between ${lo} and ${hi}`);
    if (v < lo || v > hi) throw new InputError(`${name}: ${v} is outside ${lo}..${hi}; give ${unit} in that range`);
    return v;
  };
}

export const parseKv = numberOption('--kv', 10, 3000, 'the accelerating voltage in kV');
const absorptionRatio = numberOption('--absorption', 0, 1, `"${THERMAL_DIFFUSE}" (the default) or a constant ratio xi_g/xi'_g`);
/** --absorption: "thermal-diffuse" (absorption per beam from thermal diffuse scattering) or a ratio xi_g/xi'_g in 0..1. */
export function parseAbsorption(text: string): AbsorptionSetting {
  return text.trim() === THERMAL_DIFFUSE ? THERMAL_DIFFUSE : absorptionRatio(text);
}

export const parseBlurNm = numberOption('--blur-nm', 0, 1000, 'the standard deviation of the point spread in nm');

export function parseContrast(text: string): 'shared' | 'each' {
  if (text === 'shared' || text === 'each') return text;
  throw new InputError(`--contrast: "${text.slice(0, 40)}" is not a contrast mode; give "shared" (one scale for all conditions) or "each"`);
}

/** `demo --size`: a whole number of pixels per side. */
export function parseDemoSize(text: string): number {
  const v = numberOption('--size', 16, 1024, 'the image side in pixels')(text);
  if (!Number.isInteger(v)) throw new InputError(`--size: ${v} is not a whole number; give the image side in pixels (16..1024)`);
  return v;
}
