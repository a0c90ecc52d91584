/** Read and validate a scenario file (the file is never modified). */
import { readFileSync } from 'node:fs';
import { InputError } from '../errors.js';
import { parseScenario } from '../scenario/parse.js';
export function loadScenario(path) {
    let text;
    try {
        text = readFileSync(path, 'utf8');
    }
    catch (e) {
        const code = e.code;
        throw new InputError(`scenario file "${path}" cannot be read (${code ?? 'error'}); check the path`);
    }
    let raw;
    try {
        raw = JSON.parse(text);
    }
    catch (e) {
        throw new InputError(`scenario file "${path}" is not valid JSON (${e.message}); fix the syntax`);
    }
    return parseScenario(raw);
}
