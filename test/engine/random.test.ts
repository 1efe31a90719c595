import { describe, expect, it } from 'vitest';
import { createRandom } from '../../src/engine/index.js';

describe('seeded random numbers', () => {
  it('gives the same stream for the same seed and a different one for another seed', () => {
    const a = createRandom(42);
    const b = createRandom(42);
    const c = createRandom(43);
    const xa = Array.from({ length: 100 }, () => a.next());
    const xb = Array.from({ length: 100 }, () => b.next());
    const xc = Array.from({ length: 100 }, () => c.next());
    expect(xa).toEqual(xb);
    expect(xa).not.toEqual(xc);
  });

  it('distinguishes seeds that differ only above 32 bits', () => {
    expect(createRandom(1).next()).not.toBe(createRandom(1 + 2 ** 32).next());
  });

  it('fill() produces exactly the values of as many next() calls, and the stream continues after it', () => {
    const a = createRandom(7);
    const b = createRandom(7);
    const buf = new Uint32Array(1000);
    a.fill(buf);
    const direct = Array.from({ length: 1000 }, () => b.next());
    expect(Array.from(buf)).toEqual(direct);
    expect(a.next()).toBe(b.next());
  });

  it('draws uniforms in [0, 1) and integers in 0..n-1 with the right frequencies', () => {
    const r = createRandom(1);
    const counts = new Array<number>(7).fill(0);
    let lo = 1;
    let hi = 0;
    for (let i = 0; i < 70_000; i++) {
      const u = r.uniform();
      lo = Math.min(lo, u);
      hi = Math.max(hi, u);
      counts[r.int(7)]!++;
    }
    expect(lo).toBeGreaterThanOrEqual(0);
    expect(hi).toBeLessThan(1);
    // Each count is binomial(70,000, 1/7): mean 10,000, sd 92; 5 sd either way.
    for (const c of counts) expect(Math.abs(c - 10_000)).toBeLessThan(460);
  });

  it('draws normals with mean 0, variance 1, skewness 0 and kurtosis 3', () => {
    const r = createRandom(5);
    const n = 200_000;
    let s1 = 0;
    let s2 = 0;
    let s3 = 0;
    let s4 = 0;
    for (let i = 0; i < n; i++) {
      const x = r.normal();
      s1 += x;
      s2 += x * x;
      s3 += x * x * x;
      s4 += x * x * x * x;
    }
    // Standard errors at n = 200,000: mean 0.0022, variance 0.0032, third moment 0.0055, fourth 0.022.
    expect(Math.abs(s1 / n)).toBeLessThan(0.011);
    expect(Math.abs(s2 / n - 1)).toBeLessThan(0.016);
    expect(Math.abs(s3 / n)).toBeLessThan(0.03);
    expect(Math.abs(s4 / n - 3)).toBeLessThan(0.11);
  });
});
