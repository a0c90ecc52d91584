/** The README's scenario example is a real file that parses (plumbing: checks documentation against code). */
import fs from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../src/scenario/parse.js';

describe('README scenario example', () => {
  it('is the JSON of scenarios/readme-example.json, with no comments, and the parser accepts it', () => {
    const readme = fs.readFileSync('README.md', 'utf8');
    const m = /## Scenario files[\s\S]*?```json\n([\s\S]*?)```/.exec(readme);
    expect(m).not.toBeNull();
    const block = JSON.parse(m![1]) as unknown;
    const file = JSON.parse(fs.readFileSync('scenarios/readme-example.json', 'utf8')) as unknown;
    expect(block).toEqual(file);
    expect(() => parseScenario(file)).not.toThrow();
  });
});
