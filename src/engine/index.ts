// The engine's public surface: pure statistics, no I/O, no global state (the only module-level
// state is a memo of t quantiles, which cannot change any result). See docs/design.md for the conventions.
export * from './types.js';
export { tQuantile, tCdf, normalQuantile, normalCdf, chiSquareCdf, chiSquareQuantile, fCdf } from './dist.js';
export { createRandom, type Random } from './random.js';
export { fitMethod, isFit } from './methods.js';
export { defaultLags, runResidualTests } from './checks.js';
export { runBacktest } from './backtest.js';
export { selectMethod } from './select.js';
export { simulatePaths } from './simulate.js';
export { chooseIntervalKind, makeForecast, tailProbability, quantileAt } from './forecast.js';
export { analyse } from './analyse.js';
