export * from './types.js';
export { splitEpochs } from './epochs.js';
export { chiSquareCdf, chiSquareSf } from './chisquare.js';
export {
  weightedLine,
  lineAt,
  lineUAt,
  newTestUAt,
  type WeightedLine,
  type LineUncertainty,
} from './line.js';
export {
  epochLine,
  yearsSince,
  YEAR_MS,
  DAY_MS,
  type TrendLine,
  type TrendQuantity,
} from './trendline.js';
export {
  forecastThresholdCrossing,
  type ThresholdForecast,
  type ForecastStatus,
} from './forecast.js';
export {
  detectStep,
  CUSUM_K,
  CUSUM_H,
  LATEST_Z_LIMIT,
  MIN_PRIOR,
  MIN_BIRGE_DOF,
  type StepCheck,
} from './step.js';
export {
  outletStatus,
  fleetOrder,
  assessEpoch,
  DEFAULT_SOON_DAYS,
  type OutletStatus,
  type StatusWord,
  type EpochAssessment,
} from './status.js';
export {
  outletTrend,
  outletTrendDetailed,
  BAND_POINTS,
  type EpochDetail,
  type OutletTrend,
  type EpochTrend,
  type SeriesPoint,
  type BandPoint,
  type TrendSegment,
} from './outlet.js';
export {
  testSchedule,
  predictNewTest,
  checkIntervalDays,
  ageInWords,
  DEFAULT_TEST_INTERVAL_DAYS,
  MAX_TEST_INTERVAL_DAYS,
  type TestSchedule,
  type NewTestPrediction,
  type IntervalSource,
} from './due.js';
export {
  simulateFoulingHistory,
  seededUniform,
  seededNormal,
  type FoulingHistoryOptions,
  type FoulingHistory,
} from './simulate.js';
