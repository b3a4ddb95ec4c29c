import { writeFileSync, renameSync } from 'node:fs';
import { basename } from 'node:path';
import { performance } from 'node:perf_hooks';
import { analyzeDrainTest, expandWorkbook } from '../core/analyze.js';
import { textReport } from '../core/analysis/text-report.js';
import { InputError } from '../core/errors.js';
import { parseVesselFile } from '../core/vessel/schema.js';
import { fitSvg } from '../render/fit-svg.js';
import { EXIT_NOT_CONVERGED, EXIT_OK, EXIT_REFUSED, guarded, readInputFile } from './io.js';
import { READ_OPTIONS, parseCommandLine, settingsFrom } from './options.js';
import { UNITS_HELP, unitsFrom } from './units-option.js';
import { comparedFit, comparisonLines, type ComparedFit } from '../core/compare/table.js';

const USAGE = () => `usage: efflux fit <log.csv> [more logs…] --vessel <vessel.json> [options]

Fits the outlet's effective area Cd·a and discharge coefficient Cd to a drain test log.

model:
  --fit-inflow           also fit a constant unknown inflow (a leaking inlet valve)
  --fit-datum            also fit the sensor zero's elevation (needed when the vessel file has none)
  --fit-exponent         also fit the head exponent n (0.5 for an orifice)
reading (when the file does not say it):
  --time-column NAME     --level-column NAME    --unit UNIT (e.g. cm, kPa)
  --quantity level|gauge-pressure|absolute-pressure|distance-from-top
  --date-order dmy|mdy|ymd   --tz ZONE (e.g. Europe/Lisbon)   --baro FILE (barometric log)
  --delimiter CHAR       --decimal . or ,
  --level-tag TAG        --baro-tag TAG  (files with one row per time, tag and value)
  --sheet NAME           the workbook sheet to read (.xlsx; default the first)
  --window START..END    seconds from the log's start, or ISO 8601 timestamps
output:
  --json                 one JSON object on stdout (one per line for several logs)
  --plot FILE.svg        a picture of the log, the window, the fitted curve and the residuals
  ${UNITS_HELP}
With several logs the text ends with a comparison table: Cd·a, Cd and their expanded uncertainties,
  and for each pair the difference, its expanded uncertainty and the E_n number (|E_n| ≤ 1: agree).
exit codes: 0 done, 2 input refused (the message names the file, line or field), 3 fitted but the
  fit did not converge (do not use its numbers; with several logs, 2 wins over 3), other: internal fault.
`;

export async function runFit(argv: string[]): Promise<number> {
  return guarded(async () => {
    const { values, positionals } = parseCommandLine(argv, {
      ...READ_OPTIONS,
      'fit-inflow': { type: 'boolean' },
      'fit-datum': { type: 'boolean' },
      'fit-exponent': { type: 'boolean' },
      plot: { type: 'string' },
      units: { type: 'string' },
    });
    if (values.help) {
      process.stdout.write(USAGE());
      return EXIT_OK;
    }
    if (positionals.length === 0)
      throw new InputError(
        'no log file given (usage: efflux fit <log.csv> --vessel <vessel.json>)',
      );
    if (!values.vessel)
      throw new InputError(
        'no vessel file given: add --vessel <vessel.json> (shape, outlet bore and elevation, sensor zero)',
      );
    if (values.plot && positionals.length > 1)
      throw new InputError('--plot takes one log at a time');
    const units = unitsFrom(values.units);
    const settings = settingsFrom(values);
    const vesselFile = readInputFile(values.vessel, 1024 * 1024);
    const vessel = parseVesselFile(new TextDecoder().decode(vesselFile.bytes), values.vessel);
    const baro = values.baro ? readInputFile(values.baro) : undefined;
    const batch = positionals.length > 1;
    let refused = 0;
    let unconverged = 0;
    const compared: ComparedFit[] = [];
    for (const [i, path] of positionals.entries()) {
      if (batch) process.stderr.write(`[${i + 1}/${positionals.length}] ${path}\n`);
      try {
        const t0 = performance.now();
        const log = readInputFile(path);
        const readMs = performance.now() - t0;
        const outcome = analyzeDrainTest(
          await expandWorkbook({ log, baro, vessel, vesselFileName: values.vessel, settings }),
          { now: () => performance.now() },
        );
        outcome.fit.timing.parseMs += readMs;
        (outcome.fit.timing as Record<string, number>).peakRssMB =
          process.resourceUsage().maxRSS / 1024;
        if (values.json) {
          const body = batch
            ? JSON.stringify({ file: path, ...outcome.fit })
            : JSON.stringify(outcome.fit, null, 2);
          process.stdout.write(body + '\n');
        } else {
          if (batch) process.stdout.write(`\n== ${path}\n`);
          process.stdout.write(textReport(outcome.fit, { units }));
        }
        compared.push(
          comparedFit(basename(path), outcome.fit as unknown as Record<string, unknown>),
        );
        if (values.plot) writeAtomically(values.plot, fitSvg(outcome.fit));
        if (!outcome.fit.converged) {
          unconverged++;
          process.stderr.write(
            `efflux: ${path}: the fit did not converge; do not use its numbers\n`,
          );
        }
      } catch (err) {
        if (!(err instanceof InputError) || !batch) throw err;
        refused++;
        process.stderr.write(`efflux: ${err.toLine()}\n`);
      }
    }
    if (batch && !values.json && compared.length > 1)
      process.stdout.write(`\n${comparisonLines(compared, units).join('\n')}\n`);
    if (batch)
      process.stderr.write(
        `${positionals.length - refused} fitted (${unconverged} not converged), ${refused} refused\n`,
      );
    return refused ? EXIT_REFUSED : unconverged ? EXIT_NOT_CONVERGED : EXIT_OK;
  });
}

/** Write to a temporary name and rename, so a failed run leaves no half-written file. */
function writeAtomically(path: string, text: string): void {
  const tmp = `${path}.${process.pid}.tmp`;
  writeFileSync(tmp, text);
  renameSync(tmp, path);
}
