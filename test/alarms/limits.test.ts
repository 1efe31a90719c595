import { describe, expect, it } from 'vitest';
import { assessLimit } from '../../src/alarms/index.js';
import { createRandom, fitMethod, isFit, makeForecast, normalCdf, type Fit } from '../../src/engine/index.js';
import type { LimitOptions } from '../../src/config/types.js';

function randomWalk(n: number, sigma: number, drift: number, seed: number): Float64Array {
  const rnd = createRandom(seed);
  const y = new Float64Array(n);
  let level = 100;
  for (let t = 0; t < n; t++) {
    level += drift + sigma * rnd.normal();
    y[t] = level;
  }
  return y;
}

function fitted(method: 'naive' | 'drift', y: Float64Array): Fit {
  const f = fitMethod(method, y, 1);
  if (!isFit(f)) throw new Error(f.reason);
  return f;
}

const limitAbove = (value: number, steps: number, risk = 0.05): LimitOptions => ({
  above: value,
  below: null,
  within: { steps },
  withinLabel: String(steps),
  risk,
});

describe('limit crossing', () => {
  it('gives the first-passage probability of a Gaussian random walk (reflection principle with the discrete-time correction)', () => {
    // For a Gaussian random walk with step sd sigma and no drift, the chance of reaching a level a
    // above the start within n steps is, by the reflection principle for Brownian motion with
    // Siegmund's (1979) corrected diffusion approximation for discrete steps (the level moves up by
    // beta*sigma, beta = -zeta(1/2)/sqrt(2 pi) ~ 0.5826; constant from memory):
    //   P ~ 2 (1 - Phi((a + 0.5826 sigma) / (sigma sqrt(n)))).
    const y = randomWalk(400, 1, 0, 11);
    const fit = fitted('naive', y);
    const n = 100;
    const a = 10 * fit.sigma;
    const fc = makeForecast(fit, { horizon: n, levels: [95], kind: 'analytic', paths: 1, seed: 1 });
    const r = assessLimit({
      fit,
      forecast: fc,
      lastValue: y[y.length - 1]!,
      limit: limitAbove(y[y.length - 1]! + a, n, 0.05),
      within: n,
      paths: 40_000,
      seed: 5,
      timeAtStep: () => null,
    });
    const expected = 2 * (1 - normalCdf((a + 0.5826 * fit.sigma) / (fit.sigma * Math.sqrt(n)), 0, 1));
    // Monte Carlo sd with 40,000 paths is about 0.0023; allow 3 of them plus the approximation's error.
    expect(Math.abs(r.probability - expected)).toBeLessThan(0.01);
    // First passage exceeds the chance of being beyond the limit at the window's end (here 1 - Phi(1)).
    expect(r.probability).toBeGreaterThan(1 - normalCdf(a / (fit.sigma * Math.sqrt(n)), 0, 1) + 0.05);
    expect(r.atRisk).toBe(true);
    expect(r.paths).toBe(40_000);
  });

  it('puts the point crossing where the drift line reaches the limit and the bound crossing no later', () => {
    const y = randomWalk(200, 0.5, 2, 3);
    const fit = fitted('drift', y);
    const last = y[y.length - 1]!;
    const slope = (last - y[0]!) / (y.length - 1); // drift slope (y_T - y_1)/(T - 1), docs/design.md
    const limit = last + 30.5;
    const fc = makeForecast(fit, { horizon: 40, levels: [95], kind: 'analytic', paths: 1, seed: 1 });
    const r = assessLimit({
      fit,
      forecast: fc,
      lastValue: last,
      limit: limitAbove(limit, 40),
      within: 40,
      paths: 2000,
      seed: 2,
      timeAtStep: (h) => `step ${h}`,
    });
    expect(r.pointCrossing).toEqual({
      step: Math.ceil(30.5 / slope),
      time: `step ${Math.ceil(30.5 / slope)}`,
    });
    expect(r.boundCrossing!.step).toBeLessThanOrEqual(r.pointCrossing!.step);
    expect(r.probability).toBeGreaterThan(0.9);
  });

  it('reports a limit already crossed as at risk with probability 1, without simulating', () => {
    const y = randomWalk(100, 1, 0, 4);
    const fit = fitted('naive', y);
    const last = y[y.length - 1]!;
    const fc = makeForecast(fit, { horizon: 10, levels: [95], kind: 'analytic', paths: 1, seed: 1 });
    const r = assessLimit({
      fit,
      forecast: fc,
      lastValue: last,
      limit: { above: null, below: last + 1, within: { steps: 10 }, withinLabel: '10', risk: 0.05 },
      within: 10,
      paths: 1000,
      seed: 1,
      timeAtStep: () => null,
    });
    expect(r).toMatchObject({ side: 'below', alreadyCrossed: true, atRisk: true, probability: 1, paths: 0 });
    expect(r.pointCrossing?.step).toBe(1);
  });

  it('is not at risk when the limit is far beyond any plausible path', () => {
    const y = randomWalk(300, 1, 0, 8);
    const fit = fitted('naive', y);
    const last = y[y.length - 1]!;
    const fc = makeForecast(fit, { horizon: 30, levels: [95], kind: 'bootstrap', paths: 1000, seed: 1 });
    const r = assessLimit({
      fit,
      forecast: fc,
      lastValue: last,
      limit: limitAbove(last + 60 * fit.sigma, 30),
      within: 30,
      paths: 1000,
      seed: 1,
      timeAtStep: () => null,
    });
    expect(r).toMatchObject({ atRisk: false, probability: 0, pointCrossing: null, boundCrossing: null });
  });
});
