// Interval levels: the one place that says what a level is and what follows from it. A level is a
// percentage strictly between 0 and 100; a two-sided interval at level L leaves (1 − L/100)/2 of the
// forecast distribution beyond each bound. Config sorts and de-duplicates the levels once
// (normaliseLevels); the engine checks them at its entry points (checkLevels); every tail mass, key
// of a per-level record and band lookup goes through here.

/** Throws a RangeError naming the value when a level list is empty or a level is outside (0, 100). */
export function checkLevels(levels: readonly number[]): void {
  if (levels.length === 0) throw new RangeError('levels must list at least one level');
  for (const l of levels)
    if (!(l > 0 && l < 100))
      throw new RangeError(`each level (a percentage) must be between 0 and 100; got ${l}`);
}

/** Ascending, each level once: the order every table, chart and record uses. */
export function normaliseLevels(levels: readonly number[]): number[] {
  return [...new Set(levels)].sort((a, b) => a - b);
}

/** The probability inside an interval at `level`: level/100. */
export function levelShare(level: number): number {
  return level / 100;
}

/** The probability outside a two-sided interval at `level`: 1 − level/100. */
export function levelOutside(level: number): number {
  return 1 - levelShare(level);
}

/** The probability beyond each bound of a two-sided interval at `level`: (1 − level/100)/2. */
export function levelTail(level: number): number {
  return levelOutside(level) / 2;
}

/** The key of a level in per-level records (`lower`, `upper`, coverage): the level as written, "95". */
export function levelKey(level: number): string {
  return String(level);
}

/** An index far past any level: setting it once turns a record's indexed storage into a dictionary. */
const FAR_INDEX = '1000000';

/**
 * A per-level record (keys by levelKey) holding valueOf(level, k) for levels[k]. The same record as
 * `{ "80": …, "95": … }` to every reader, built small: V8 keeps integer-like keys such as "95" in an
 * array sized past the largest one (about 1.2 KB for 80 and 95), unless the first index set lies far
 * beyond, when it keeps a dictionary (about 0.2 KB). A results series holds 30 and more of these
 * records, thousands of series are held at once, so this is most of a run's memory otherwise.
 */
export function levelRecord(
  levels: readonly number[],
  valueOf: (level: number, k: number) => number,
): Record<string, number> {
  const r: Record<string, number> = {};
  r[FAR_INDEX] = 0;
  delete r[FAR_INDEX];
  levels.forEach((l, k) => (r[levelKey(l)] = valueOf(l, k)));
  return r;
}

/** The band at `level`; a RangeError when the bands do not include it (a caller's mistake). */
export function bandAt<B extends { level: number }>(bands: readonly B[], level: number): B {
  const band = bands.find((b) => b.level === level);
  if (!band)
    throw new RangeError(
      `no interval band at level ${level} (bands: ${bands.map((b) => b.level).join(', ')})`,
    );
  return band;
}
