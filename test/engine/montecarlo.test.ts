// Seeded Monte Carlo: each method on its own model, analytic 80% and 95% intervals at steps 1 and H
// cover within ±1 percentage point of nominal over 20,000 draws. The standard error of a coverage
// share at 20,000 draws is at most 0.28 points (80%) and 0.15 points (95%), so ±1 point is over 3.5 se.
import { describe, expect, it } from 'vitest';
import { createRandom, fitMethod, isFit, makeForecast, type MethodName } from '../../src/engine/index.js';

const DRAWS = 20_000;
const T = 24;
const H = 6;
const M = 4;

/** Simulates T + H values of the method's own model into `buf`. */
function simulateModel(method: MethodName, rnd: ReturnType<typeof createRandom>, buf: Float64Array): void {
  const n = buf.length;
  if (method === 'mean') for (let t = 0; t < n; t++) buf[t] = 50 + 3 * rnd.normal();
  else if (method === 'naive' || method === 'drift') {
    let v = 100;
    const mu = method === 'drift' ? 0.7 : 0;
    for (let t = 0; t < n; t++) buf[t] = v += mu + 2 * rnd.normal();
  } else {
    for (let t = 0; t < n; t++) buf[t] = (t < M ? 10 * t : buf[t - M]!) + 1.5 * rnd.normal();
  }
}

describe.each(['mean', 'naive', 'drift', 'seasonal-naive'] as const)('%s on its own model', (method) => {
  it(`analytic 80% and 95% intervals cover within ±1 point at steps 1 and ${H} over ${DRAWS} draws`, () => {
    const rnd = createRandom(20_240 + method.length);
    const buf = new Float64Array(T + H);
    const train = buf.subarray(0, T);
    const inside = { '80-1': 0, '95-1': 0, [`80-${H}`]: 0, [`95-${H}`]: 0 } as Record<string, number>;
    for (let d = 0; d < DRAWS; d++) {
      simulateModel(method, rnd, buf);
      const f = fitMethod(method, train, method === 'seasonal-naive' ? M : 1);
      if (!isFit(f)) throw new Error(f.reason);
      const fc = makeForecast(f, { horizon: H, levels: [80, 95], kind: 'analytic', paths: 1, seed: 1 });
      for (const b of fc.bands)
        for (const h of [1, H]) {
          const a = buf[T + h - 1]!;
          if (a >= b.lower[h - 1]! && a <= b.upper[h - 1]!) inside[`${b.level}-${h}`]!++;
        }
    }
    for (const [key, n] of Object.entries(inside)) {
      const level = Number(key.split('-')[0]) / 100;
      const share = n / DRAWS;
      expect(Math.abs(share - level), `${key}: coverage ${share}`).toBeLessThanOrEqual(0.01);
    }
  });
});
