/** Read and validate a scenario file (the file is never modified). */
import { excerpt, InputError } from '../errors.js';
import { MAX_SCENARIO_BYTES, readInputFile } from './readInput.js';
import { parseScenario } from '../scenario/parse.js';
import type { Scenario } from '../scenario/types.js';

/** The raw JSON object of a scenario file; InputError when it cannot be read, is not JSON or not an object. */
export function readScenarioJson(path: string): Record<string, unknown> {
  const text = readInputFile(path, 'scenario file', MAX_SCENARIO_BYTES).toString('utf8');
  const shown = `"${excerpt(path, 80)}"`;
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (e) {
    throw new InputError(`scenario file ${shown} is not valid JSON (${excerpt((e as Error).message, 100)}); fix the syntax`);
  }
  if (typeof raw !== 'object' || raw === null || Array.isArray(raw)) {
    throw new InputError(`scenario file ${shown} must hold one JSON object { ... }`);
  }
  return raw as Record<string, unknown>;
}

export function loadScenario(path: string): Scenario {
  return parseScenario(readScenarioJson(path));
}
