import { it } from 'vitest';
import { fitAmplitudes } from '../../src/analysis/ranking.js';
it('x', () => {
  console.log(JSON.stringify(fitAmplitudes([{ cs: 0.8, ss: 1, cc: 1 }, { cs: 0.01, ss: 1, cc: 1 }], [true, true], 1.5)));
});
