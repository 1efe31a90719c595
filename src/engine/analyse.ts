// The engine's whole job for one series: fit every candidate, backtest, select, forecast with
// intervals, and check the residuals of the chosen fit.
import {
  BOOTSTRAP_COVERAGE_NOTE,
  EMPIRICAL_COVERAGE_NOTE,
  measureCoverage,
  runBacktest,
} from './backtest.js';
import { runResidualTests } from './checks.js';
import { DEFAULT_MIN_ERRORS } from './forecast.js';
import { checkLevels } from './levels.js';
import { makeForecast } from './forecast.js';
import { fitMethod, isFit, methodLabel } from './methods.js';
import { selectMethod } from './select.js';
import type { Analysis, AnalysisFailure, EngineOptions, Fit, FitFailure, MethodName } from './types.js';

function validate(o: EngineOptions): void {
  const whole = (v: number, min: number, key: string): void => {
    if (!Number.isInteger(v) || v < min)
      throw new RangeError(`${key} must be a whole number of at least ${min}; got ${v}`);
  };
  whole(o.season, 1, 'season');
  whole(o.horizon, 1, 'horizon');
  whole(o.backtest.minTrain, 1, 'backtest.minTrain');
  whole(o.backtest.horizon, 1, 'backtest.horizon');
  whole(o.paths, 1, 'paths');
  if (o.methods.length === 0) throw new RangeError('methods must list at least one method');
  checkLevels(o.levels);
}

/**
 * Analyses one series (NaN = missing). Options that no config could produce (a horizon of 0, a
 * level of 100) throw a RangeError naming the value; anything the data does is answered with notes,
 * or with an AnalysisFailure when no candidate method can be fitted.
 */
export function analyse(y: Float64Array, o: EngineOptions): Analysis | AnalysisFailure {
  validate(o);
  const fits: Partial<Record<MethodName, Fit>> = {};
  const failures: FitFailure[] = [];
  const candidates: MethodName[] = [];
  for (const method of o.methods) {
    if (fits[method]) continue;
    const f = fitMethod(method, y, o.season);
    if (isFit(f)) {
      fits[method] = f;
      candidates.push(method);
    } else failures.push(f);
  }
  const notes = failures.map((f) => `${capital(methodLabel(f.method))} left out: ${f.reason}`);
  if (candidates.length === 0)
    return {
      ok: false,
      reason: `No method could be fitted. ${failures.map((f) => f.reason).join(' ')}`,
      failures,
      notes,
    };

  const base = {
    season: o.season,
    minTrain: o.backtest.minTrain,
    horizon: o.backtest.horizon,
    levels: o.levels,
    seed: o.seed,
  };
  // Analytic coverage for every candidate (cheap, at every origin). The coverage of the kind the
  // forecast uses is then measured for the chosen method only.
  const backtest = runBacktest(y, candidates, { ...base, coverage: ['analytic'] });
  const selection = selectMethod(backtest, candidates, o.score);
  const chosen = fits[selection.method]!;
  const checks = runResidualTests(chosen);
  const forecast = makeForecast(chosen, {
    horizon: o.horizon,
    levels: o.levels,
    kind: o.intervals,
    paths: o.paths,
    seed: o.seed,
    checks,
    backtest: backtest.methods[chosen.method]!,
  });
  const chosenBt = backtest.methods[chosen.method]!;
  if (forecast.kind !== 'analytic')
    chosenBt.coverage[forecast.kind] = measureCoverage(y, chosenBt, forecast.kind, base);
  if (forecast.kind === 'empirical') backtest.notes.push(EMPIRICAL_COVERAGE_NOTE(DEFAULT_MIN_ERRORS));
  if (forecast.kind === 'bootstrap') backtest.notes.push(BOOTSTRAP_COVERAGE_NOTE);
  const mb = backtest.methods[chosen.method];
  for (const n of [...chosen.notes, ...backtest.notes, ...(mb?.notes ?? []), ...forecast.notes])
    if (!notes.includes(n)) notes.push(n);
  return { ok: true, fits, failures, backtest, selection, chosen, forecast, checks, notes };
}

function capital(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}
