// Small numerical helpers shared by the engine: compensated sums, scaled sums of squares, and
// sample quantiles. Missing values are anything non-finite (NaN, and also ±Infinity).

import { scratch } from './workspace.js';

/** True for a usable observation: finite. NaN (missing) and ±Infinity are treated as missing. */
export function present(x: number): boolean {
  return Number.isFinite(x);
}

/**
 * Mean and sum of squared deviations of the finite entries of xs, in two passes: a compensated mean
 * (corrected once by the compensated mean of the deviations, which removes the rounding of the
 * first pass), then the squared deviations summed after scaling by a power of two near the largest
 * deviation, so that neither huge (1e200) nor tiny (1e-200) magnitudes overflow or underflow.
 * `center`, when given, replaces the sample mean as the point deviations are taken from.
 */
export interface Squares {
  n: number;
  mean: number;
  /** Sum of squared deviations (may overflow or underflow at extreme magnitudes; use `sd`). */
  ss: number;
  /** sqrt(ss / df) computed without forming ss: scale * sqrt(scaled ss / df). */
  sd: (df: number) => number;
}

export function meanAndSquares(xs: ArrayLike<number>, center?: number): Squares {
  // First pass: the count and the sum by Neumaier's improved Kahan summation (Neumaier 1974): the
  // running compensation c0 collects the low-order bits lost when adding a small term to a large
  // sum (or the reverse), so the sum is as if computed in about twice the precision.
  let n = 0;
  let s0 = 0;
  let c0 = 0;
  for (let i = 0; i < xs.length; i++) {
    const x = xs[i]!;
    if (!Number.isFinite(x)) continue;
    n++;
    const t = s0 + x;
    c0 += Math.abs(s0) >= Math.abs(x) ? s0 - t + x : x - t + s0;
    s0 = t;
  }
  if (n === 0) return { n: 0, mean: NaN, ss: NaN, sd: () => NaN };
  let mean = (s0 + c0) / n;
  if (!Number.isFinite(mean)) {
    // The sum overflowed: average the halves of each value instead.
    let s = 0;
    for (let i = 0; i < xs.length; i++) if (Number.isFinite(xs[i]!)) s += xs[i]! / n;
    mean = s;
  }
  // Second pass: compensated mean of deviations (zero in exact arithmetic).
  let s = 0;
  let c = 0;
  for (let i = 0; i < xs.length; i++) {
    const x = xs[i]!;
    if (!Number.isFinite(x)) continue;
    const d = x - mean;
    const t = s + d;
    c += Math.abs(s) >= Math.abs(d) ? s - t + d : d - t + s;
    s = t;
  }
  mean += (s + c) / n;
  const m = center ?? mean;
  let big = 0;
  for (let i = 0; i < xs.length; i++) {
    const x = xs[i]!;
    if (Number.isFinite(x)) big = Math.max(big, Math.abs(x - m));
  }
  if (big === 0 || !Number.isFinite(big)) {
    const spread = big === 0 ? 0 : Infinity;
    return { n, mean, ss: spread, sd: () => spread };
  }
  const k = powerOfTwoBelow(big);
  let sum = 0;
  for (let i = 0; i < xs.length; i++) {
    const x = xs[i]!;
    if (!Number.isFinite(x)) continue;
    const d = (x - m) / k;
    sum += d * d;
  }
  // Only final values are captured by sd: a variable a closure captures lives boxed on the heap, and
  // a loop updating it would allocate at every step (so `big` and `sum` stay uncaptured).
  const ss = sum;
  return { n, mean, ss: ss * k * k, sd: (df: number) => Math.sqrt(ss / df) * k };
}

/** The power of two 2^floor(log2 x) for x > 0 (exact scaling factor). */
export function powerOfTwoBelow(x: number): number {
  const e = Math.floor(Math.log2(x));
  return 2 ** Math.max(-1022, Math.min(1023, e));
}

/**
 * The unit to work in for a series of extreme magnitude: when its largest finite value in size lies
 * beyond 2^±300, that value rounded down to a power of two (so dividing by it is exact and squares
 * of differences neither overflow nor underflow); otherwise 1.
 */
export function extremeUnit(y: ArrayLike<number>): number {
  let big = 0;
  for (let i = 0; i < y.length; i++) if (present(y[i]!)) big = Math.max(big, Math.abs(y[i]!));
  return big > 2 ** 300 || (big > 0 && big < 2 ** -300) ? powerOfTwoBelow(big) : 1;
}

/** The series in units of `unit` (the array itself when the unit is 1). Exact for a power of two. */
export function inUnits(y: Float64Array, unit: number): Float64Array {
  return unit === 1 ? y : y.map((v) => v / unit);
}

/** Number of entries < x in an ascending array (branch-free halving: the comparisons are random). */
export function lowerBound(a: ArrayLike<number>, x: number, n = a.length): number {
  if (n === 0) return 0;
  let base = 0;
  while (n > 1) {
    const half = n >>> 1;
    base += Number(a[base + half - 1]! < x) * half;
    n -= half;
  }
  return base + Number(a[base]! < x);
}

/** Number of entries <= x in an ascending array (branch-free, as lowerBound). */
export function upperBound(a: ArrayLike<number>, x: number, n = a.length): number {
  if (n === 0) return 0;
  let base = 0;
  while (n > 1) {
    const half = n >>> 1;
    base += Number(a[base + half - 1]! <= x) * half;
    n -= half;
  }
  return base + Number(a[base]! <= x);
}

/**
 * Sorts `a` ascending in place, in the order TypedArray.prototype.sort gives (-0 before +0, NaN
 * last), and returns it: a quicksort (median of three, insertion sort below 16 entries), faster than
 * the built-in sort on the few hundred to few thousand entries the engine sorts.
 */
export function sortAscending(a: Float64Array): Float64Array {
  return sortInPlace(a, null);
}

/**
 * sortAscending, moving `idx` along with `a` (idx[k] travels with a[k]) unless `a` holds NaN (then
 * the built-in sort, and idx unchanged: the caller checks with hasNaN). Zeros of both signs end
 * together, -0 first; which index lands on which zero is unspecified.
 */
function sortInPlace(a: Float64Array, idx: Int32Array | null): Float64Array {
  let zeros = 0;
  for (let i = 0; i < a.length; i++) {
    const x = a[i]!;
    if (x !== x) return a.sort(); // NaN: the built-in order
    if (x === 0) zeros++;
  }
  quicksort(a, idx, 0, a.length - 1);
  if (zeros > 1) {
    // Equal under <, so the zeros lie together in some order: put -0 first, as the built-in sort does.
    let i = lowerBound(a, 0);
    let neg = 0;
    for (let k = i; k < i + zeros; k++) if (Object.is(a[k], -0)) neg++;
    for (; neg > 0; neg--, zeros--) a[i++] = -0;
    for (; zeros > 0; zeros--) a[i++] = 0;
  }
  return a;
}

/** Where the last `partition` left its right part: a[partitionRight..hi] are all >= the pivot. */
let partitionRight = 0;

/**
 * Hoare's partition of a[lo..hi] around the median of a[lo], a[mid], a[hi]: afterwards a[lo..j] <=
 * pivot <= a[partitionRight..hi] (and anything between equals the pivot). Returns j. Shared by the
 * sort and the selection; `idx`, when given, is swapped along with `a`.
 */
function partition(a: Float64Array, idx: Int32Array | null, lo: number, hi: number): number {
  const mid = (lo + hi) >>> 1;
  let x = a[lo]!;
  let y = a[mid]!;
  let z = a[hi]!;
  if (x > y) [x, y] = [y, x];
  if (y > z) [y, z] = [z, y];
  if (x > y) [x, y] = [y, x];
  const pivot = y;
  let i = lo;
  let j = hi;
  while (i <= j) {
    while (a[i]! < pivot) i++;
    while (a[j]! > pivot) j--;
    if (i <= j) {
      const t = a[i]!;
      a[i] = a[j]!;
      a[j] = t;
      if (idx !== null) {
        const u = idx[i]!;
        idx[i] = idx[j]!;
        idx[j] = u;
      }
      i++;
      j--;
    }
  }
  partitionRight = i;
  return j;
}

function quicksort(a: Float64Array, idx: Int32Array | null, lo: number, hi: number): void {
  while (hi - lo > 16) {
    const j = partition(a, idx, lo, hi);
    const i = partitionRight;
    // Recurse into the smaller part, loop on the larger: the stack stays O(log n).
    if (j - lo < hi - i) {
      quicksort(a, idx, lo, j);
      lo = i;
    } else {
      quicksort(a, idx, i, hi);
      hi = j;
    }
  }
  if (idx === null)
    for (let i = lo + 1; i <= hi; i++) {
      const x = a[i]!;
      let j = i - 1;
      while (j >= lo && a[j]! > x) {
        a[j + 1] = a[j]!;
        j--;
      }
      a[j + 1] = x;
    }
  else
    for (let i = lo + 1; i <= hi; i++) {
      const x = a[i]!;
      const u = idx[i]!;
      let j = i - 1;
      while (j >= lo && a[j]! > x) {
        a[j + 1] = a[j]!;
        idx[j + 1] = idx[j]!;
        j--;
      }
      a[j + 1] = x;
      idx[j + 1] = u;
    }
}

const sortedCache = new WeakMap<Float64Array, Float64Array | (() => Float64Array)>();
const rankCache = new WeakMap<Float64Array, Int32Array>();

/**
 * An ascending copy of `xs`, computed once per array (the backtest's errors are sorted for the
 * empirical intervals, their coverage and every later tail probability). Callers must not change
 * `xs` afterwards, nor the copy. The same sort also records each entry's rank (see sortedRanks).
 */
export function sortedCopy(xs: Float64Array): Float64Array {
  const known = sortedIfKnown(xs);
  if (known) return known;
  const n = xs.length;
  const s = xs.slice();
  const idx = scratch.i32('sort.index', n); // where each sorted entry came from
  for (let k = 0; k < n; k++) idx[k] = k;
  sortInPlace(s, idx);
  sortedCache.set(xs, s);
  if (n === 0 || s[n - 1] === s[n - 1]) {
    // No NaN (it sorts last): idx says where each entry went; ties share their first position.
    const first = new Int32Array(n);
    let g = 0;
    for (let k = 0; k < n; k++) {
      if (k > 0 && s[k] !== s[k - 1]) g = k;
      first[idx[k]!] = g;
    }
    rankCache.set(xs, first);
  }
  return s;
}

/**
 * The ascending copy of `xs` (sortedCopy) and, for each entry xs[j], the first position of its
 * value among the sorted ones: lowerBound(sorted, xs[j]), the number of entries below it (ties, and
 * -0 with +0, share it). From the sort itself when sortedCopy made the copy; by binary search
 * otherwise. Callers must not change either array.
 */
export function sortedRanks(xs: Float64Array): { sorted: Float64Array; first: Int32Array } {
  const sorted = sortedCopy(xs);
  let first = rankCache.get(xs);
  if (!first) {
    first = new Int32Array(xs.length);
    for (let j = 0; j < xs.length; j++) first[j] = lowerBound(sorted, xs[j]!);
    rankCache.set(xs, first);
  }
  return { sorted, first };
}

/** The ascending copy of `xs` when sortedCopy already made it (or was told how), else undefined. */
export function sortedIfKnown(xs: Float64Array): Float64Array | undefined {
  let s = sortedCache.get(xs);
  if (typeof s === 'function') {
    s = s();
    sortedCache.set(xs, s);
  }
  return s;
}

/**
 * Records the ascending copy of `xs` (exactly that), or how to make it without a sort, made when
 * first asked for, for sortedCopy.
 */
export function rememberSorted(xs: Float64Array, sorted: Float64Array | (() => Float64Array)): void {
  sortedCache.set(xs, sorted);
}

/**
 * A Fenwick (binary indexed) tree of counts over positions 0..n-1 (Fenwick 1994): add one at a
 * position, count the positions below k, and find the k-th smallest occupied position, each in
 * O(log n). `reset(n)` empties it for reuse with up to its capacity.
 */
export class Fenwick {
  private tree: Int32Array;
  /** The count at each position, and 1 at position n (where a scan past the last item stops). */
  private counts: Int32Array;
  private n = 0;
  private top = 1;
  /** The last kth answer (0: none since the last change): k, its position, its rank there. */
  private lastK = 0;
  private lastPos = 0;
  private lastWithin = 0;

  constructor(capacity: number) {
    this.tree = new Int32Array(capacity + 1);
    this.counts = new Int32Array(capacity + 1);
  }

  reset(n: number): void {
    if (n + 1 > this.tree.length) {
      this.tree = new Int32Array(n + 1);
      this.counts = new Int32Array(n + 1);
    } else {
      this.tree.fill(0, 0, n + 1);
      this.counts.fill(0, 0, n);
    }
    this.counts[n] = 1;
    this.n = n;
    let top = 1;
    while (top * 2 <= n) top *= 2;
    this.top = top;
    this.lastK = 0;
  }

  /** Counts one more at position p (0-based). */
  add(p: number): void {
    const t = this.tree;
    for (let k = p + 1; k <= this.n; k += k & -k) t[k]!++;
    this.counts[p]!++;
    this.lastK = 0;
  }

  /** The count at positions 0..k-1. */
  below(k: number): number {
    const t = this.tree;
    let s = 0;
    for (let q = k; q > 0; q -= q & -q) s += t[q]!;
    return s;
  }

  /**
   * The position (0-based) holding the k-th counted item (k from 1; n when fewer are counted).
   * Asked for the item after the last one asked for (a quantile's two neighbours), it steps on from
   * there instead of descending the tree again.
   */
  kth(k: number): number {
    if (k === this.lastK + 1 && this.lastK > 0 && this.lastPos < this.n) {
      let pos = this.lastPos;
      if (this.lastWithin < this.counts[pos]!) this.lastWithin++;
      else {
        do pos++;
        while (this.counts[pos] === 0);
        this.lastPos = pos;
        this.lastWithin = 1;
      }
      this.lastK = k;
      return pos;
    }
    const t = this.tree;
    let pos = 0;
    let rest = k;
    for (let step = this.top; step > 0; step >>= 1) {
      const nx = pos + step;
      if (nx <= this.n && t[nx]! < rest) {
        pos = nx;
        rest -= t[nx]!;
      }
    }
    // rest is now k's rank among the items at pos.
    this.lastK = k;
    this.lastPos = pos;
    this.lastWithin = rest;
    return pos;
  }
}

/**
 * Sample quantile of an ascending sorted array by linear interpolation between order statistics:
 * x_(j) + g (x_(j+1) - x_(j)) with position (n - 1) p (Hyndman & Fan 1996, definition 7).
 * NaN for an empty array or p outside [0, 1].
 */
export function sortedQuantile(sorted: ArrayLike<number>, p: number, from = 0, to = sorted.length): number {
  const n = to - from;
  if (n <= 0 || !(p >= 0 && p <= 1)) return NaN;
  const pos = (n - 1) * p;
  const j = Math.floor(pos);
  const g = pos - j;
  const a = sorted[from + j]!;
  if (g === 0 || j + 1 >= n) return a;
  const b = sorted[from + j + 1]!;
  return a + g * (b - a);
}

/** A finite number shown to 4 significant digits (for findings and reasons). */
export function fmt(x: number, digits = 4): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a >= 1e6 || a < 1e-4) return x.toExponential(digits - 1);
  return String(Number(x.toPrecision(digits)));
}

/**
 * Definition-7 quantiles (see sortedQuantile) of an unsorted sample at several probabilities, by
 * selection instead of a full sort: the needed order statistics are placed with Hoare's
 * quickselect, each within the part left of the previous one. `work` is reordered.
 */
export function selectQuantiles(work: Float64Array, probs: ArrayLike<number>, out: Float64Array): void {
  const n = work.length;
  if (n === 0) {
    out.fill(NaN);
    return;
  }
  // Needed ranks (0-based), ascending and distinct.
  const ranks: number[] = [];
  for (let k = 0; k < probs.length; k++) {
    const pos = (n - 1) * probs[k]!;
    const j = Math.floor(pos);
    ranks.push(j);
    if (pos > j && j + 1 < n) ranks.push(j + 1);
  }
  ranks.sort((a, b) => a - b);
  let lo = 0;
  let prev = -1;
  for (const r of ranks) {
    if (r === prev) continue;
    select(work, lo, n - 1, r);
    lo = r + 1;
    prev = r;
  }
  for (let k = 0; k < probs.length; k++) {
    const pos = (n - 1) * probs[k]!;
    const j = Math.floor(pos);
    const g = pos - j;
    const a = work[j]!;
    out[k] = g === 0 || j + 1 >= n ? a : a + g * (work[j + 1]! - a);
  }
}

/** Puts the k-th smallest of a[lo..hi] at a[k], smaller ones left of it, larger right (Hoare). */
function select(a: Float64Array, lo: number, hi: number, k: number): void {
  while (hi > lo) {
    const j = partition(a, null, lo, hi);
    const i = partitionRight;
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return;
  }
}

/**
 * x rounded to `digits` significant digits and written back as the shortest double that prints so
 * (so JSON carries "0.0812" rather than "0.08123456789012345"). Non-finite x is returned as is.
 */
export function significant(x: number, digits = 6): number {
  return Number.isFinite(x) && x !== 0 ? Number(x.toPrecision(digits)) : x;
}

/**
 * x rounded to the decimal place `digits` below the leading digit of `scale` (its uncertainty, e.g. a
 * standard error): digits beyond that carry no information. With no usable scale (0, NaN), x is
 * rounded to 12 significant digits instead.
 */
export function toScale(x: number, scale: number, digits = 4): number {
  if (!Number.isFinite(x) || x === 0) return x;
  if (!(scale > 0) || !Number.isFinite(scale)) return significant(x, 12);
  const decimals = digits - 1 - Math.floor(Math.log10(scale));
  if (decimals <= 0) {
    const q = 10 ** -decimals;
    return Math.round(x / q) * q;
  }
  return decimals > 100 ? x : Number(x.toFixed(decimals));
}
