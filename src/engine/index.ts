// The engine's public surface: pure statistics, no I/O, no global state that can change a result
// (module-level state: a memo of t quantiles and the scratch workspace, each written before it is
// read). See docs/design.md for the conventions.
export * from './types.js';
export { tQuantile, tCdf, normalQuantile, normalCdf, chiSquareCdf, chiSquareQuantile, fCdf } from './dist.js';
export { createRandom, type Random } from './random.js';
export { fitMethod, isFit } from './methods.js';
export { defaultLags, runResidualTests } from './checks.js';
export { prefixBacktest, runBacktest } from './backtest.js';
export { selectMethod } from './select.js';
export { simulatePaths } from './simulate.js';
export { chooseIntervalKind, makeForecast, tailProbability, quantileAt } from './forecast.js';
export { analyse } from './analyse.js';
export {
  bandAt,
  checkLevels,
  levelKey,
  levelRecord,
  normaliseLevels,
  levelOutside,
  levelShare,
  levelTail,
} from './levels.js';
export { significant, toScale } from './numeric.js';
