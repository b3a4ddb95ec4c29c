export { canonicalJson, normalised } from './canonical.js';
export { contentHash, reportIdOf, withIdentity, reportJson, type Sha256Hex } from './identity.js';
export {
  buildFitReport,
  FIT_REPORT_FORMAT,
  REPORT_FORMAT_VERSION,
  type FitReport,
  type ReportQuantity,
  type ReportParameter,
} from './fit-report.js';
export {
  buildOutletReport,
  latestRecordTime,
  OUTLET_REPORT_FORMAT,
  DEFAULT_ACTION_THRESHOLD_PCT,
  type OutletReport,
  type OutletReportFit,
} from './outlet-report.js';
export { compareReports, type ReportDifference } from './compare.js';
export { SCOPE_STATEMENT } from './statement.js';
export type * from './records.js';
