import { prepareDrainTest, detectedSummary, expandWorkbook } from '../core/analyze.js';
import { isZip } from '../core/ingest/workbook.js';
import { InputError } from '../core/errors.js';
import { describeLog } from '../core/ingest/describe.js';
import { readLevelLog, readLogTags } from '../core/ingest/read-log.js';
import type { TagSummary } from '../core/ingest/long-format.js';
import { parseVesselFile } from '../core/vessel/schema.js';
import { chooseDrainWindow } from '../core/window/index.js';
import { parseWindowSetting } from '../core/analysis/window-setting.js';
import { EXIT_OK, guarded, readInputFile } from './io.js';
import { READ_OPTIONS, parseCommandLine, settingsFrom } from './options.js';

const USAGE = `usage: efflux inspect <log.csv> [--vessel vessel.json] [reading options] [--json]

Shows what efflux reads from a logger file — columns, units, time format, span, sample interval,
gaps, spikes and the candidate drain windows — without fitting. With --vessel, pressure and
distance-from-top logs are converted with the vessel's fluid and mount height, and the end of the
window is cut relative to the outlet. A file with one row per time, tag and value lists its tags with
their units and row counts until --level-tag names the level. Reading options are those of \`efflux fit\`.
`;

export async function runInspect(argv: string[]): Promise<number> {
  return guarded(async () => {
    const { values, positionals } = parseCommandLine(argv, READ_OPTIONS);
    if (values.help) {
      process.stdout.write(USAGE);
      return EXIT_OK;
    }
    if (positionals.length !== 1)
      throw new InputError('give exactly one log file (usage: efflux inspect <log.csv>)');
    const settings = settingsFrom(values);
    const log = readInputFile(positionals[0]);
    // A long-format file with several tags and none named: list them, so the level tag can be named.
    const tags =
      settings.levelTag === undefined && !isZip(log.bytes)
        ? readLogTags(log.bytes, log.fileName, settings)
        : null;
    if (tags && tags.length > 1) {
      const listed = {
        tags,
        hint: 'one row per time and tag: name the level tag with --level-tag TAG (and the barometric one with --baro-tag)',
      };
      process.stdout.write(
        values.json
          ? JSON.stringify(listed, null, 2) + '\n'
          : tagText(positionals[0], tags, listed.hint),
      );
      return EXIT_OK;
    }
    const baro = values.baro ? readInputFile(values.baro) : undefined;
    let detected: Record<string, unknown>;
    if (values.vessel) {
      const vf = readInputFile(values.vessel, 1024 * 1024);
      const vessel = parseVesselFile(new TextDecoder().decode(vf.bytes), values.vessel);
      detected = detectedSummary(
        prepareDrainTest(
          await expandWorkbook({ log, baro, vessel, vesselFileName: values.vessel, settings }),
        ),
      );
    } else {
      const text = await expandWorkbook({ log, baro, vessel: null, settings });
      const series = readLevelLog(text.log.bytes, text.log.fileName, {
        ...settings,
        baro: text.baro,
      });
      const window = settings.window
        ? parseWindowSetting(settings.window, series.t0EpochMs, settings.tz)
        : undefined;
      const choice = chooseDrainWindow(series, { window });
      detected = {
        ...describeLog(series),
        window: choice.window,
        candidates: choice.candidates,
        spikes: choice.spikes,
        flatLines: choice.flatLines,
        clipping: choice.clipping,
        trims: choice.trims,
        windowNotes: choice.notes,
        windowWarnings: choice.warnings,
      };
    }
    process.stdout.write(
      values.json
        ? JSON.stringify(detected, null, 2) + '\n'
        : inspectText(positionals[0], detected),
    );
    return EXIT_OK;
  });
}

function tagText(file: string, tags: TagSummary[], hint: string): string {
  const out = [`${file}: ${tags.length} tags`];
  for (const t of tags)
    out.push(`  ${JSON.stringify(t.tag)}${t.unit ? ` [${t.unit}]` : ''}: ${t.rows} rows`);
  out.push(`  ${hint}`);
  return out.join('\n') + '\n';
}

const num = (x: unknown, d = 3) =>
  typeof x === 'number' && Number.isFinite(x) ? x.toFixed(d) : '—';

function inspectText(file: string, d: Record<string, any>): string {
  const out: string[] = [`${file}: ${d.samples} samples`];
  out.push(
    `  time: ${d.start ?? 'elapsed only'} … ${d.end ?? ''} (${num(d.durationS, 1)} s), median interval ${num(d.medianIntervalS, 3)} s`,
  );
  out.push(
    `  level reading: ${num(d.level?.firstM)} m at the start, ${num(d.level?.lastM)} m at the end, range ${num(d.level?.minM)} … ${num(d.level?.maxM)} m`,
  );
  out.push('  columns:');
  for (const c of d.columns ?? [])
    out.push(
      `    ${String(c.index + 1).padStart(2)}. ${JSON.stringify(c.header)} → ${c.role}${c.unit ? ` [${c.unit}]` : ''} — ${c.reason}`,
    );
  if (d.tags?.length) {
    out.push('  tags (one row per time and tag):');
    for (const t of d.tags)
      out.push(`    ${JSON.stringify(t.tag)}${t.unit ? ` [${t.unit}]` : ''}: ${t.rows} rows`);
  }
  if (d.metadata?.length) {
    out.push('  preamble kept as metadata:');
    for (const m of d.metadata) out.push(`    line ${m.line}: ${m.text}`);
  }
  for (const n of d.notes ?? []) out.push(`  note: ${n.message}`);
  for (const g of d.gaps ?? [])
    out.push(`  gap: ${num(g.durationS, 1)} s after line ${g.afterLine}`);
  out.push(`  drain candidates (${(d.candidates ?? []).length}):`);
  for (const c of d.candidates ?? [])
    out.push(
      `    ${num(c.startS, 1)} s … ${num(c.endS, 1)} s, falling ${num(c.dropM)} m over ${num(c.durationS, 0)} s`,
    );
  const w = d.window;
  if (w)
    out.push(`  chosen window: ${num(w.startS, 1)} s … ${num(w.endS, 1)} s (${w.samples} samples)`);
  for (const t of d.trims ?? []) out.push(`    trimmed ${t.what}: ${t.reason}`);
  for (const n of d.windowNotes ?? []) out.push(`  window note: ${n.message}`);
  if (d.spikes?.length)
    out.push(
      `  spikes left out (${d.spikes.length}): ${d.spikes
        .slice(0, 12)
        .map((s: any) => `line ${s.line}`)
        .join(', ')}${d.spikes.length > 12 ? ', …' : ''}`,
    );
  for (const r of d.flatLines ?? []) out.push(`  flat line: ${r.reason}`);
  for (const r of d.clipping ?? []) out.push(`  clipped: ${r.reason}`);
  for (const w2 of [...(d.warnings ?? []), ...(d.windowWarnings ?? [])])
    out.push(`  ! ${w2.message}`);
  return out.join('\n') + '\n';
}
