/** Read and validate a scenario file (the file is never modified). */
import { excerpt, InputError } from '../errors.js';
import { MAX_SCENARIO_BYTES, readInputFile } from './readInput.js';
import { parseScenario } from '../scenario/parse.js';
import { locateJsonError } from '../scenario/jsonSyntax.js';
import type { Scenario } from '../scenario/types.js';
import { scenarioWarnings } from '../analysis/scenarioWarnings.js';

/** The raw JSON object of a scenario file; InputError when it cannot be read, is not JSON or not an object. */
export function readScenarioJson(path: string): Record<string, unknown> {
  return scenarioJsonOf(readScenarioBytes(path), path);
}

/** The bytes of a scenario file, read once with the size limit and the regular-file check of readInput.ts. */
export function readScenarioBytes(path: string): Buffer {
  return readInputFile(path, 'scenario file', MAX_SCENARIO_BYTES);
}

/** The JSON object held by a scenario file's bytes; InputError (naming `path`) when it is not JSON or not an object. */
export function scenarioJsonOf(bytes: Buffer, path: string): Record<string, unknown> {
  let text = bytes.toString('utf8');
  const shown = `"${excerpt(path, 80)}"`;
  let raw: unknown;
  // a byte-order mark (some editors write one) is not part of the JSON text
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  try {
    raw = JSON.parse(text);
  } catch (e) {
    const at = locateJsonError(text);
    if (at !== null) throw new InputError(`scenario file ${shown} is not valid JSON at line ${at.line}, column ${at.column}: ${at.message}`);
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

/** The scenario's warnings (implausible values, defects outside the view ...) and any `extra` ones, each printed as one line on stderr. */
export function warnAbout(sc: Scenario, extra: readonly string[] = []): string[] {
  const warnings = [...scenarioWarnings(sc), ...extra];
  printWarnings(warnings);
  return warnings;
}

/** Each warning as one line on stderr. */
export function printWarnings(warnings: readonly string[]): void {
  for (const w of warnings) process.stderr.write(`thinfoil: warning: ${w}\n`);
}
