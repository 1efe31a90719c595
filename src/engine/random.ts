// Seeded random numbers: xoshiro128** (Blackman & Vigna, 2018) seeded through splitmix32.
//
// All state updates are 32-bit integer operations (Math.imul, shifts), so the same seed gives the
// same stream of integers, uniforms and bootstrap resamples on every machine and JavaScript engine.
// normal() uses the Box–Muller transform (Math.log, Math.cos, Math.sin), whose last bit could in
// principle differ between engines; Node's V8 implements them with the same fdlibm port everywhere.

export interface Random {
  /** Uniform on [0, 1), with 32 bits of resolution. */
  uniform(): number;
  /** Standard normal draw (Box–Muller; the second value of each pair is kept for the next call). */
  normal(): number;
  /** Uniform integer in 0..n-1 (n >= 1; n up to 2^32). */
  int(n: number): number;
  /** Raw 32-bit unsigned integer. */
  next(): number;
  /** Fills `out` with the next out.length raw 32-bit integers (the same values as that many next() calls). */
  fill(out: Uint32Array): void;
}

/** splitmix32 step: a well-mixed 32-bit value from a counter (used only to fill the seed state). */
function splitmix32(state: { s: number }): number {
  state.s = (state.s + 0x9e3779b9) | 0;
  let z = state.s;
  z = Math.imul(z ^ (z >>> 16), 0x85ebca6b);
  z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35);
  return (z ^ (z >>> 16)) >>> 0;
}

/**
 * A generator seeded from any finite number (its integer part; the low and high 32 bits both count).
 * Non-finite seeds are treated as 0.
 */
export function createRandom(seed: number): Random {
  const whole = Number.isFinite(seed) ? Math.trunc(seed) : 0;
  const lo = whole >>> 0;
  const hi = Math.floor(whole / 4294967296) >>> 0;
  const sm = { s: lo ^ Math.imul(hi, 0x27d4eb2d) };
  let a = splitmix32(sm);
  let b = splitmix32(sm);
  let c = splitmix32(sm);
  let d = splitmix32(sm);
  if ((a | b | c | d) === 0) a = 1; // the all-zero state is the one fixed point
  let spare = NaN;

  const next = (): number => {
    const r = Math.imul(rotl(Math.imul(b, 5), 7), 9);
    const t = b << 9;
    c ^= a;
    d ^= b;
    b ^= c;
    a ^= d;
    c ^= t;
    d = rotl(d, 11);
    return r >>> 0;
  };
  const uniform = (): number => next() / 4294967296;
  const fill = (out: Uint32Array): void => {
    // The same recurrence as next(), on locals (no closure traffic in the loop).
    let A = a;
    let B = b;
    let C = c;
    let D = d;
    for (let i = 0; i < out.length; i++) {
      out[i] = Math.imul(rotl(Math.imul(B, 5), 7), 9);
      const t = B << 9;
      C ^= A;
      D ^= B;
      B ^= C;
      A ^= D;
      C ^= t;
      D = rotl(D, 11);
    }
    a = A;
    b = B;
    c = C;
    d = D;
  };
  return {
    next,
    fill,
    uniform,
    int: (n: number): number => Math.floor(uniform() * n),
    normal: (): number => {
      if (!Number.isNaN(spare)) {
        const s = spare;
        spare = NaN;
        return s;
      }
      // 1 - u is in (0, 1], so the log is finite.
      const r = Math.sqrt(-2 * Math.log(1 - uniform()));
      const theta = 2 * Math.PI * uniform();
      spare = r * Math.sin(theta);
      return r * Math.cos(theta);
    },
  };
}

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}
