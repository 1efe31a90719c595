// Numbers for people: values, p-values, shares and counted nouns. Every report, log line, annotation
// and reason sentence formats numbers through here, so one value reads the same everywhere.

const formatters = new Map<string, Intl.NumberFormat>();
function formatter(digits: number, grouping: boolean): Intl.NumberFormat {
  const key = `${digits}${grouping ? ',' : ''}`;
  let f = formatters.get(key);
  if (!f) {
    f = new Intl.NumberFormat('en-US', { maximumSignificantDigits: digits, useGrouping: grouping });
    formatters.set(key, f);
  }
  return f;
}

export interface NumOptions {
  /**
   * Thousands separators (default true, for reports). Off for annotations and terminal lines, where
   * "[1,234, 1,300]" would be ambiguous and numbers are searched for as typed.
   */
  grouping?: boolean;
}

/**
 * A value for people: `digits` significant digits (4 unless asked), thousands separators unless
 * turned off, exponent notation below 1e-4; "n/a" when missing or not finite.
 */
export function num(x: number | null | undefined, digits = 4, opts: NumOptions = {}): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return 'n/a';
  if (x !== 0 && Math.abs(x) < 1e-4) return x.toExponential(Math.max(2, digits - 2));
  // A whole number below 1,000 that fits the digits prints as itself, with or without grouping: the
  // same text Intl gives (tested against it), without building a formatter for it. A run that only
  // prints such numbers (counts, "one time in 20") never loads the locale data, a cold start's
  // largest single cost after compiling.
  const d = Math.min(21, Math.max(1, digits));
  if (Number.isInteger(x) && Math.abs(x) < Math.min(1000, 10 ** d)) return String(x === 0 ? 0 : x);
  return formatter(d, opts.grouping ?? true).format(x === 0 ? 0 : x);
}

/** The value `num` shows, as a number (for comparing what two printed values say). */
function shown(x: number, digits: number): number {
  if (x !== 0 && Math.abs(x) < 1e-4) return Number(x.toExponential(Math.max(2, digits - 2)));
  return Number(x.toPrecision(digits));
}

/**
 * Values printed side by side that must keep their order: a value and the interval it left, a limit
 * and a forecast. Each starts at its own significant digits (`digits`, one number for all or one per
 * value) and all gain digits together until every pair that differs prints in the same order as it
 * is: never "656.9 is above [655.9, 656.9]". Values that are equal print equal.
 */
export function numsApart(
  xs: readonly number[],
  digits: number | readonly number[] = 4,
  opts: NumOptions = {},
): string[] {
  const start = xs.map((_, i) => Math.min(17, typeof digits === 'number' ? digits : (digits[i] ?? 4)));
  for (let extra = 0; extra <= 17; extra++) {
    const d = start.map((s) => Math.min(17, s + extra));
    const r = xs.map((x, i) => shown(x, d[i]!));
    let ok = true;
    for (let i = 0; i < xs.length && ok; i++)
      for (let j = 0; j < xs.length && ok; j++) if (xs[i]! < xs[j]! && !(r[i]! < r[j]!)) ok = false;
    if (ok) return xs.map((x, i) => num(x, d[i]!, opts));
  }
  return xs.map((x) => num(x, 17, opts));
}

/** Below this a p-value prints as a bound: "< 0.001". */
export const P_FLOOR = 0.001;

/**
 * A p-value: two significant digits; "< 0.001" below that, never "0". `atMost` marks a p-value that
 * is only an upper bound (the smallest a resampling test can return when the value is beyond every
 * draw): it prints as "≤ 0.048".
 */
export function pval(p: number | null | undefined, opts: { atMost?: boolean } = {}): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return 'n/a';
  if (p < P_FLOOR) return `< ${P_FLOOR}`;
  const v = String(Number(p.toPrecision(2)));
  return opts.atMost ? `≤ ${v}` : v;
}

/** "p = 0.012", "p < 0.001" or "p ≤ 0.048": a p-value in a sentence. */
export function pIs(p: number | null | undefined, opts: { atMost?: boolean } = {}): string {
  const v = pval(p, opts);
  return /^[<≤]/.test(v) ? `p ${v}` : `p = ${v}`;
}

/**
 * A chance estimated as the share of `paths` simulated paths, for people. It never reads as certain
 * or impossible: when all (or none) of the paths cross, the true chance is only known to be above
 * 1 − 3/n (below 3/n) at 95% confidence — the "rule of three" (Hanley & Lippman-Hand 1983) — and it
 * prints as that bound; a share that would round to 100.0% or 0.0% prints as "> 99.9%" or "< 0.1%".
 * Without paths (n = 0, e.g. a limit already crossed) the share prints as it is.
 */
export function chance(p: number, paths: number): string {
  if (!Number.isFinite(p) || !(paths > 0)) return pct(p);
  if (p >= 1) return `≥ ${pct(Math.max(0, 1 - 3 / paths))}`;
  if (p <= 0) return `≤ ${pct(Math.min(1, 3 / paths))}`;
  const s = pct(p);
  return s === '100.0%' ? '> 99.9%' : s === '0.0%' ? '< 0.1%' : s;
}

/** An interval level as people read it: 95 -> "95%", 97.5 -> "97.5%". */
export function levelLabel(level: number): string {
  return `${level}%`;
}

/** A share as a percentage, e.g. 0.934 -> "93.4%". */
export function pct(x: number | null | undefined, decimals = 1): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return 'n/a';
  return `${(x * 100).toFixed(decimals)}%`;
}

/** "1 alarm", "3 alarms", "2 series" (with `many`), "1 row was" / "2 rows were" (with both forms). */
export function plural(n: number, one: string, many = `${one}s`): string {
  return `${n} ${n === 1 ? one : many}`;
}

/** The word alone, agreeing with `n`: "step" or "steps", "has" or "have". */
export function agree(n: number, one: string, many = `${one}s`): string {
  return n === 1 ? one : many;
}

/** A duration as the config writes it (`30d`, `12h`, `6mo`): a positive number and m, h, d, w, mo, q or y. */
export const DURATION_PATTERN = /^\s*(\d+(?:\.\d+)?)\s*(mo|m|h|d|w|q|y)\s*$/;

const DURATION_WORD: Record<string, string> = {
  m: 'minute',
  h: 'hour',
  d: 'day',
  w: 'week',
  mo: 'month',
  q: 'quarter',
  y: 'year',
};

/**
 * A limit window read plainly: "30 days" for `30d`, "6 months" for `6mo`; a window given in steps
 * (`14`) as that many steps of the series, e.g. "14 days" with `stepWord` "day".
 */
export function windowWords(label: string, steps: number, stepWord: string): string {
  const m = DURATION_PATTERN.exec(label);
  if (m) return plural(Number(m[1]), DURATION_WORD[m[2]!]!);
  return plural(steps, stepWord);
}

/**
 * A printed value (or range) with the metric's unit, the one place "value + unit" is written:
 * "166 ms", "1,967 GB", "12%" (a unit that is a sign such as % or ° joins the number). No unit: the
 * text as it is. The unit is the user's text: escape the result for its destination.
 */
export function withUnit(text: string, unit: string | null | undefined): string {
  if (!unit || text === 'n/a') return text;
  return /^[%°‰]/.test(unit) ? `${text}${unit}` : `${text} ${unit}`;
}
