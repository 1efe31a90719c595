// A short seeded fuzzing pass (scripts/fuzz.ts): every input ends clean or in a located error.
import { describe, expect, it } from 'vitest';
import { fuzz } from '../scripts/fuzz.js';

describe('fuzzing, a short seeded pass', () => {
  it('200 mutated CSVs and configs: no crash, no hang', async () => {
    const c = await fuzz(200, 7);
    expect(c.examples).toEqual([]);
    expect(c.crashes + c.hangs).toBe(0);
    expect(c.clean + c.located).toBe(200);
    expect(c.located).toBeGreaterThan(20); // the mutations do reach the error paths
  }, 120_000);
});
