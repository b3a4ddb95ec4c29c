/**
 * The fit report model: everything an auditor needs about one fit, from the stored records alone
 * (vessel, outlet, test, raw-file hashes, settings, the fit JSON, review, history, audit entries).
 * Pure; the JSON report is its canonical serialisation and the PDF is drawn from it.
 */
import { InputError } from '../errors.js';
import { withIdentity, type Sha256Hex } from './identity.js';
import type { FitReportRecords, RawFileRecord, SoftwareRecord } from './records.js';
import { SCOPE_STATEMENT } from './statement.js';

export const FIT_REPORT_FORMAT = 'efflux-fit-report';
export const REPORT_FORMAT_VERSION = 1;

/** A measured quantity in JCGM 100:2008 terms. */
export interface ReportQuantity {
  name: string;
  symbol: string;
  unit: string;
  value: number;
  standardUncertainty: number | null;
  coverageFactor: number | null;
  expandedUncertainty: number | null;
  effectiveDegreesOfFreedom: number | null;
  interval95: [number, number] | null;
}

export interface ReportParameter extends ReportQuantity {
  free: boolean;
  atBound: boolean;
}

export interface FitReport {
  format: typeof FIT_REPORT_FORMAT;
  formatVersion: number;
  reportId: string;
  contentSha256: string;
  /** The report's own date: the review time, else the fit's creation (never the clock). */
  issuedAt: string;
  software: SoftwareRecord;
  fitId: number;
  status: string;
  vessel: {
    id: number;
    site: string;
    name: string;
    revision: number;
    shape: unknown;
    fluid: unknown;
    sensor: unknown;
    gravityMS2: number | null;
    fluidDensityKgM3: number | null;
    fluidDensitySource: string | null;
  };
  outlet: {
    id: number | null;
    key: string | null;
    type: string | null;
    boreM: number | null;
    boreToleranceM: number | null;
    elevationM: number | null;
    nominalAreaM2: number | null;
  };
  test: {
    id: number;
    testedAt: string | null;
    operator: string | null;
    loggerId: string | null;
    notes: string | null;
    uploadedAt: string;
    uploadedBy: string | null;
  };
  rawFiles: (RawFileRecord & { role: string })[];
  reading: {
    settings: Record<string, unknown>;
    columns: { header: string; role: string; unit: string | null }[];
    notes: unknown[];
    firstSampleAt: string | null;
    samples: number | null;
  };
  window: {
    startS: number;
    endS: number;
    startTime: string | null;
    endTime: string | null;
    chosenBy: string | null;
    samples: number;
    samplesInRange: number | null;
    excludedSamples: number | null;
    trims: { what: string; fromS: number; toS: number; reason: string }[];
    notes: { code: string; message: string }[];
    spikes: { count: number; lines: number[] };
    flatLines: { startS: number; endS: number; samples: number; reason: string }[];
    clipping: { startS: number; endS: number; samples: number; reason: string }[];
  };
  model: {
    equation: string;
    freeParameters: string;
    solution: string;
    terms: unknown;
    inWords: string[];
  };
  solver: Record<string, unknown>;
  results: {
    dischargeCoefficient: ReportQuantity | null;
    effectiveArea: ReportQuantity;
    profileInterval95M2: [number, number] | null;
    converged: boolean;
  };
  parameters: ReportParameter[];
  correlations: { parameters: string[]; matrix: number[][] };
  residuals: {
    samples: number | null;
    rmseM: number | null;
    maxAbsM: number | null;
    lag1Autocorrelation: number | null;
    durbinWatson: number | null;
    covariance: string | null;
    correction: string | null;
    varianceInflation: number | null;
    effectiveSamples: number | null;
    degreesOfFreedom: number | null;
    boreUncertainty: string | null;
  };
  modelComparison: unknown;
  headBands: {
    headFromM: number;
    headToM: number;
    samples: number;
    dischargeCoefficient: number;
    standardUncertainty: number;
  }[];
  /**
   * The uncertainty budget table exactly as the fit JSON states it (server/core/budget/table.ts);
   * absent for fits made before it, so the report of such a fit keeps its content and id.
   */
  budget?: { columns: string[]; rows: string[][]; totals: [string, string][]; notes: string[] };
  warnings: { stage: string | null; code: string; message: string }[];
  /** selfReview: approved by the uploader or refit requester where the site allows it (four eyes waived). */
  review: {
    decision: string;
    by: string | null;
    at: string;
    comment: string | null;
    selfReview?: true;
  } | null;
  history: {
    fitId: number;
    status: string;
    createdAt: string;
    createdBy: string | null;
    supersededBy: number | null;
    dischargeCoefficient: number | null;
    effectiveAreaM2: number | null;
    settings: Record<string, unknown>;
    thisFit: boolean;
  }[];
  audit: { seq: number; at: string; actor: string; action: string; entity: string; hash: string }[];
  /** Data for drawing: the log, the window with the fitted curve (decimated by the analysis). */
  plot: {
    log: { timeS: number[]; levelM: number[] };
    window: { offsetS: number; timeS: number[]; observedM: number[]; fittedM: number[] };
  };
  statement: string[];
}

type Json = Record<string, any>;
const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);
const str = (v: unknown): string | null => (typeof v === 'string' ? v : null);
const arr = <T = unknown>(v: unknown): T[] => (Array.isArray(v) ? (v as T[]) : []);

function quantity(
  name: string,
  symbol: string,
  unit: string,
  q: Json | null | undefined,
): ReportQuantity | null {
  if (!q || num(q.value) === null) return null;
  return {
    name,
    symbol,
    unit,
    value: q.value,
    standardUncertainty: num(q.standardUncertainty),
    coverageFactor: num(q.coverageFactor),
    expandedUncertainty: num(q.expandedUncertainty),
    effectiveDegreesOfFreedom: num(q.effectiveDegreesOfFreedom),
    interval95: Array.isArray(q.ci95) ? [q.ci95[0], q.ci95[1]] : null,
  };
}

const PARAMETER_WORDS: Record<string, [string, string]> = {
  effectiveAreaM2: ['effective area', 'Cd·a'],
  initialReadingM: ['initial reading', 'y₀'],
  sensorZeroM: ['sensor zero elevation', 'z_s'],
  inflowM3S: ['constant inflow', 'Q_in'],
  exponent: ['head exponent', 'n'],
};

function modelInWords(terms: Json | undefined, solution: string): string[] {
  const t = terms ?? {};
  return [
    'Mass balance of the vessel: the plan area at the surface times the rate of fall of the level equals the inflow less the outflow through the outlet.',
    `Outflow through the outlet: Cd·a·(2·g·H)^n with H the head of liquid above the outlet centreline; n ${t.exponent ? 'is fitted' : 'is held at 0.5 (orifice law)'}.`,
    t.inflow
      ? 'A constant inflow (for example a leaking inlet valve) is fitted.'
      : 'No inflow is assumed during the drain.',
    t.datum
      ? 'The sensor zero elevation is fitted from the data.'
      : 'The sensor zero elevation is taken from the vessel file.',
    `Predicted readings come from the ${solution}; least squares on the readings inside the window.`,
  ];
}

/** Builds the report for one fit. `software` and the hash come from the shell (version and git commit; node:crypto). */
export function buildFitReport(
  records: FitReportRecords,
  software: SoftwareRecord,
  sha256Hex: Sha256Hex,
): FitReport {
  const { vessel, outlet, test, fit } = records;
  const r = fit.result as Json;
  if (!r || typeof r !== 'object' || !r.effectiveAreaM2)
    throw new InputError(`fit ${fit.id} has no result to report`, { field: 'result' });
  const det = (test.detected ?? {}) as Json;
  const w = (r.window ?? {}) as Json;
  const um = (r.uncertaintyMethod ?? {}) as Json;
  const res = (r.residuals ?? {}) as Json;
  const k = num(um.coverageFactor);
  const parameters: ReportParameter[] = arr<Json>(r.parameters).map((p) => {
    const [words, symbol] = PARAMETER_WORDS[p.name] ?? [p.name, p.name];
    const u = p.free ? num(p.standardUncertainty) : null;
    return {
      name: words,
      symbol,
      unit: str(p.unit) ?? '',
      value: p.value,
      standardUncertainty: u,
      coverageFactor: u === null ? null : k,
      expandedUncertainty: u === null || k === null ? null : k * u,
      effectiveDegreesOfFreedom: u === null ? null : num(um.degreesOfFreedom),
      interval95: Array.isArray(p.ci95) ? [p.ci95[0], p.ci95[1]] : null,
      free: !!p.free,
      atBound: !!p.atBound,
    };
  });
  const run = (x: Json) => ({
    startS: x.startS,
    endS: x.endS,
    samples: x.samples,
    reason: String(x.reason ?? ''),
  });
  const spikes = arr<Json>(det.spikes);
  const rawFiles = [
    { role: 'level log', ...test.log },
    ...(test.baro ? [{ role: 'barometric log', ...test.baro }] : []),
  ];
  const vr = (r.vessel ?? {}) as Json;
  const spec = vessel.spec as Json;
  const out = (r.outlet ?? {}) as Json;
  const model = (r.model ?? {}) as Json;
  const solver = { ...((r.solver ?? {}) as Json) };
  const body: Omit<FitReport, 'reportId' | 'contentSha256'> = {
    format: FIT_REPORT_FORMAT,
    formatVersion: REPORT_FORMAT_VERSION,
    issuedAt: fit.review?.at ?? fit.createdAt,
    software,
    fitId: fit.id,
    status:
      fit.supersededBy !== null
        ? `${fit.status}, superseded by fit ${fit.supersededBy}`
        : fit.status,
    vessel: {
      id: vessel.id,
      site: vessel.site,
      name: vessel.name,
      revision: vessel.revision,
      shape: spec.shape ?? null,
      fluid: spec.fluid ?? null,
      sensor: spec.sensor ?? null,
      gravityMS2: num(vr.gravityMS2),
      fluidDensityKgM3: num(vr.fluidDensityKgM3),
      fluidDensitySource: str(vr.fluidDensitySource),
    },
    outlet: {
      id: outlet?.id ?? null,
      key: outlet?.key ?? null,
      type: outlet?.type ?? str(out.type),
      boreM: outlet?.boreM ?? num(out.boreM),
      boreToleranceM: outlet?.boreToleranceM ?? num(out.boreToleranceM),
      elevationM: outlet?.elevationM ?? num(out.elevationM),
      nominalAreaM2: num(out.nominalAreaM2),
    },
    test: {
      id: test.id,
      testedAt: test.testedAt,
      operator: test.operator,
      loggerId: test.loggerId,
      notes: test.notes,
      uploadedAt: test.uploadedAt,
      uploadedBy: test.uploadedBy,
    },
    rawFiles,
    reading: {
      settings: fit.settings,
      columns: arr<Json>(r.read?.columns).map((c) => ({
        header: String(c.header ?? ''),
        role: String(c.role ?? ''),
        unit: str(c.unit),
      })),
      notes: arr(r.read?.notes),
      firstSampleAt: str(r.read?.t0),
      samples: num(r.read?.samples),
    },
    window: {
      startS: w.startS,
      endS: w.endS,
      startTime: str(w.startTime),
      endTime: str(w.endTime),
      chosenBy: str(w.chosenBy),
      samples: w.samples,
      samplesInRange: num(w.samplesInRange),
      excludedSamples: num(w.excludedSamples),
      trims: arr<Json>(w.trims).map((t) => ({
        what: String(t.what),
        fromS: t.fromS,
        toS: t.toS,
        reason: String(t.reason),
      })),
      notes: arr<Json>(w.notes).map((n) => ({ code: String(n.code), message: String(n.message) })),
      spikes: { count: spikes.length, lines: spikes.map((s) => s.line) },
      flatLines: arr<Json>(det.flatLines).map(run),
      clipping: arr<Json>(det.clipping).map(run),
    },
    model: {
      equation: str(model.equation) ?? '',
      freeParameters: str(model.description) ?? '',
      solution: str(model.solution) ?? '',
      terms: model.terms ?? null,
      inWords: modelInWords(model.terms, str(model.solution) ?? 'model'),
    },
    solver,
    results: {
      dischargeCoefficient: quantity('discharge coefficient', 'Cd', '1', r.dischargeCoefficient),
      effectiveArea: quantity('effective area', 'Cd·a', 'm²', r.effectiveAreaM2)!,
      profileInterval95M2: Array.isArray(r.effectiveAreaM2.profileCi95)
        ? r.effectiveAreaM2.profileCi95
        : null,
      converged: !!r.converged,
    },
    parameters,
    correlations: {
      parameters: arr<string>(r.correlations?.parameters).map((p) => PARAMETER_WORDS[p]?.[1] ?? p),
      matrix: arr(r.correlations?.matrix),
    },
    residuals: {
      samples: num(res.samples),
      rmseM: num(res.rmseM),
      maxAbsM: num(res.maxAbsM),
      lag1Autocorrelation: num(res.lag1Autocorrelation),
      durbinWatson: num(res.durbinWatson),
      covariance: str(um.covariance),
      correction: str(um.autocorrelationCorrection),
      varianceInflation: num(um.varianceInflation),
      effectiveSamples: num(um.effectiveSamples),
      degreesOfFreedom: num(um.degreesOfFreedom),
      boreUncertainty: str(um.boreUncertainty),
    },
    modelComparison: r.modelComparison ?? null,
    headBands: arr<Json>(r.headBands).map((b) => ({
      headFromM: b.headFromM,
      headToM: b.headToM,
      samples: b.samples,
      dischargeCoefficient: b.dischargeCoefficient,
      standardUncertainty: b.standardUncertainty,
    })),
    ...(r.budget?.table
      ? {
          budget: {
            columns: arr<string>(r.budget.table.columns),
            rows: arr<string[]>(r.budget.table.rows),
            totals: arr<[string, string]>(r.budget.table.totals),
            notes: arr<string>(r.budget.notes),
          },
        }
      : {}),
    warnings: arr<Json>(r.warnings).map((x) => ({
      stage: str(x.stage),
      code: String(x.code),
      message: String(x.message),
    })),
    review: fit.review ? { ...fit.review } : null,
    history: records.history
      .slice()
      .sort((a, b) => a.id - b.id)
      .map((h) => ({
        fitId: h.id,
        status: h.status,
        createdAt: h.createdAt,
        createdBy: h.createdBy,
        supersededBy: h.supersededBy,
        dischargeCoefficient: h.dischargeCoefficient,
        effectiveAreaM2: h.effectiveAreaM2,
        settings: h.settings,
        thisFit: h.id === fit.id,
      })),
    audit: records.audit
      .slice()
      .sort((a, b) => a.seq - b.seq)
      .map((a) => ({
        seq: a.seq,
        at: a.at,
        actor: a.actor,
        action: a.action,
        entity: `${a.entityType} ${a.entityId ?? ''}`.trim(),
        hash: a.hash,
      })),
    plot: {
      log: { timeS: arr(r.plot?.log?.timeS), levelM: arr(r.plot?.log?.levelM) },
      window: {
        offsetS: num(r.plot?.window?.offsetS) ?? 0,
        timeS: arr(r.plot?.window?.timeS),
        observedM: arr(r.plot?.window?.observedM),
        fittedM: arr(r.plot?.window?.fittedM),
      },
    },
    statement: [...SCOPE_STATEMENT],
  };
  return withIdentity(
    body as unknown as Record<string, unknown>,
    sha256Hex,
  ) as unknown as FitReport;
}
