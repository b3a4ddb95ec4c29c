/**
 * The tasks the task pool runs (server/jobs/tasks.ts), each a pure function of what it is given:
 * the input and output types, and `runTask`, which the worker thread calls. Imported for its types
 * on the HTTP thread, for its code only in the worker.
 */
import type { AnalysisRequest } from '../core/analysis-contract.js';
import type { FitReport, OutletReport } from '../core/report/index.js';
import type { UnitSystem } from '../core/format/unit-system.js';
import type { JointFitReport } from '../core/report/joint-fit-report.js';
import { renderFitReportPdf } from '../render/fit-report-pdf.js';
import { renderJointFitReportPdf } from '../render/joint-fit-report-pdf.js';
import { renderOutletReportPdf } from '../render/outlet-report-pdf.js';
import { assembleExport, type ExportAssembly } from '../render/period-export-assembly.js';
import { systemFitAnswer, type SystemFitInput } from './system-fit.js';
import { inspectAnswer, seriesAnswer, type SeriesRequest } from './workbench-read.js';

export interface TaskIo {
  /** A report and the units it is written in (the asker's preference; core/format). */
  'fit-report-pdf': { input: { report: FitReport; units: UnitSystem }; output: Uint8Array };
  'outlet-report-pdf': { input: { report: OutletReport; units: UnitSystem }; output: Uint8Array };
  zip: { input: ExportAssembly; output: Uint8Array };
  inspect: { input: AnalysisRequest; output: Uint8Array };
  series: { input: SeriesRequest; output: Uint8Array };
  'system-fit': { input: SystemFitInput; output: Record<string, unknown> };
  'joint-fit-report-pdf': { input: JointFitReport; output: Uint8Array };
}

export type TaskKind = keyof TaskIo;
export type TaskInput<K extends TaskKind> = TaskIo[K]['input'];
export type TaskOutput<K extends TaskKind> = TaskIo[K]['output'];

export async function runTask<K extends TaskKind>(
  kind: K,
  input: TaskInput<K>,
): Promise<TaskOutput<K>> {
  switch (kind) {
    case 'fit-report-pdf': {
      const { report, units } = input as TaskIo['fit-report-pdf']['input'];
      return (await renderFitReportPdf(report, units)) as TaskOutput<K>;
    }
    case 'outlet-report-pdf': {
      const { report, units } = input as TaskIo['outlet-report-pdf']['input'];
      return (await renderOutletReportPdf(report, units)) as TaskOutput<K>;
    }
    case 'zip':
      return assembleExport(input as ExportAssembly) as TaskOutput<K>;
    case 'inspect':
      return (await inspectAnswer(input as AnalysisRequest)) as TaskOutput<K>;
    case 'series':
      return (await seriesAnswer(input as SeriesRequest)) as TaskOutput<K>;
    case 'system-fit':
      return systemFitAnswer(input as SystemFitInput) as TaskOutput<K>;
    case 'joint-fit-report-pdf':
      return (await renderJointFitReportPdf(input as JointFitReport)) as TaskOutput<K>;
  }
  throw new Error(`unknown task "${String(kind)}"`);
}
