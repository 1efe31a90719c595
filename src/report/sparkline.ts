// A compact sparkline from Unicode block characters, for table cells.

const BLOCKS = ['▁', '▂', '▃', '▄', '▅', '▆', '▇', '█'];

/**
 * The last `width` values as block characters scaled between their minimum and maximum; a missing or
 * non-finite value is a middle dot, a flat series a row of middle blocks. Empty input gives "".
 */
export function sparkline(values: readonly (number | null)[], width = 20): string {
  const tail = values.slice(Math.max(0, values.length - width));
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of tail) {
    if (v === null || !Number.isFinite(v)) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  return tail
    .map((v) => {
      if (v === null || !Number.isFinite(v)) return '·';
      if (hi === lo) return BLOCKS[3]!;
      const k = Math.round(((v - lo) / (hi - lo)) * (BLOCKS.length - 1));
      return BLOCKS[Math.min(BLOCKS.length - 1, Math.max(0, k))]!;
    })
    .join('');
}
