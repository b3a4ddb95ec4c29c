import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyzeDrainTest } from '../../../server/core/analyze.js';
import { textReport } from '../../../server/core/analysis/text-report.js';
import { InputError } from '../../../server/core/errors.js';
import { readLevelLog } from '../../../server/core/ingest/read-log.js';
import { efflux } from '../../cli/run-cli.js';
import { simulateMessy, type MessyLog } from '../window/messy-sim.js';

/**
 * Messy field exports with known truth (invented data): clock changes, plant-historian exports
 * (ISO 8601 basic format, thousands separators, metadata above a quoted header, one row per time
 * and tag) and intervals that say little. The drain: a 1 m cylinder through a 50 mm sharp-edged
 * orifice (Cd 0.61, a usual value: common practice) from 1.5 m of head.
 */
const trueCd = 0.61;
const drain: MessyLog = {
  diameterM: 1.0,
  effectiveAreaM2: (trueCd * Math.PI * 0.05 ** 2) / 4,
  head0M: 1.5,
  holdS: 60,
  drainS: 300,
  rateHz: 1,
  noiseM: 0.0005,
  seed: 7,
};
const vessel = {
  name: 'Test column TC-2 (invented)',
  shape: { kind: 'vertical-cylinder', diameterM: 1.0, heightM: 2.0 },
  outlet: { id: 'orifice', boreM: 0.05, boreToleranceM: 0, elevationM: 0, type: 'sharp-edged' },
  sensor: { zeroElevationM: 0 },
};
const enc = (s: string) => new TextEncoder().encode(s);
const fit = (text: string, fileName: string, settings = {}) =>
  analyzeDrainTest({ log: { bytes: enc(text), fileName }, vessel, settings }).fit;
const relErr = (cd: number) => Math.abs(cd / trueCd - 1);

/** ISO 8601 basic format, UTC. */
function basic(ms: number): string {
  return new Date(ms)
    .toISOString()
    .replace(/[-:]/g, '')
    .replace(/\.000Z$/, 'Z');
}
/** 2,099.9 style (comma groups, point decimal) or 2.099,9 style. */
function grouped(x: number, style: 'comma' | 'dot'): string {
  const [int, frac] = x.toFixed(1).split('.');
  const g = int.replace(/\B(?=(\d{3})+(?!\d))/g, style === 'comma' ? ',' : '.');
  return style === 'comma' ? `${g}.${frac}` : `${g},${frac}`;
}

const { series } = simulateMessy(drain);
const t0 = Date.UTC(2026, 5, 11, 7, 0, 0);

describe('clocks that clash', () => {
  // Local time in a zone whose clocks go back on 2026-10-25 at 03:00 (to 02:00): the drain log
  // runs from 01:30 local (summer time) over the repeated hour, 10 s a row.
  const slow: MessyLog = {
    diameterM: 3.0,
    effectiveAreaM2: (trueCd * Math.PI * 0.05 ** 2) / 4,
    head0M: 2.0,
    holdS: 2400,
    drainS: 4800,
    rateHz: 0.1,
    noiseM: 0.0005,
    seed: 3,
  };
  const sim = simulateMessy(slow).series;
  const startUtc = Date.UTC(2026, 9, 24, 23, 30, 0); // 01:30 CEST
  const local = (utcMs: number) => {
    const offsetH = utcMs < Date.UTC(2026, 9, 25, 1, 0, 0) ? 2 : 1; // Europe/Madrid: CEST then CET
    return new Date(utcMs + offsetH * 3_600_000).toISOString().slice(0, 19).replace('T', ' ');
  };
  const rows = ['Timestamp,Level (m)'];
  for (let i = 0; i < sim.timeS.length; i++)
    rows.push(`${local(startUtc + sim.timeS[i] * 1000)},${sim.levelM[i].toFixed(4)}`);
  const text = rows.join('\n') + '\n';
  const tankVessel = {
    ...vessel,
    shape: { kind: 'vertical-cylinder', diameterM: 3.0, heightM: 3.0 },
  };

  it('refuses a local-time log over the autumn clock change without --tz, naming the clock change and --tz; with --tz it fits', () => {
    let err: unknown;
    try {
      analyzeDrainTest({
        log: { bytes: enc(text), fileName: 'autumn.csv' },
        vessel: tankVessel,
        settings: {},
      });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(InputError);
    expect((err as InputError).message).toMatch(/clock change/);
    expect((err as InputError).message).toMatch(/--tz/);
    expect((err as InputError).line).toBeGreaterThan(1);
    const ok = analyzeDrainTest({
      log: { bytes: enc(text), fileName: 'autumn.csv' },
      vessel: tankVessel,
      settings: { tz: 'Europe/Madrid' },
    }).fit;
    expect(ok.converged).toBe(true);
    expect(relErr(ok.dischargeCoefficient!.value)).toBeLessThan(0.002);
  });

  it('the CLI exits 2 for it and stores nothing (the message on stderr names the clock change)', () => {
    const dir = mkdtempSync(join(tmpdir(), 'efflux-clock-'));
    writeFileSync(join(dir, 'autumn.csv'), text);
    writeFileSync(join(dir, 'v.json'), JSON.stringify(tankVessel));
    const r = efflux(['fit', join(dir, 'autumn.csv'), '--vessel', join(dir, 'v.json'), '--json']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/clock change.*--tz/);
    expect(r.stdout).toBe('');
  });

  it('refuses rows that clash with earlier times beyond 3 %, and keeps the first of a few with a warning', () => {
    const many = ['elapsed_s,level_m'];
    for (let i = 0; i < 100; i++) many.push(`${i},${(2 - i * 0.01).toFixed(3)}`);
    for (let i = 10; i < 20; i++) many.push(`${i},${(1 - i * 0.01).toFixed(3)}`);
    expect(() => readLevelLog(enc(many.join('\n')), 'clash.csv')).toThrow(
      /10 of 110 rows repeat an earlier time/,
    );
    const few = many.slice(0, 101).concat(['5,9.000']);
    const s = readLevelLog(enc(few.join('\n')), 'few.csv');
    expect(s.warnings.some((w) => w.code === 'conflicting-duplicates')).toBe(true);
  });
});

describe('plant historian exports', () => {
  it('a basic-format, thousands-separator, metadata-headed export fits within 0.1 % of the truth', () => {
    const lines = [
      '"Export","Kestrel Fen works historian (fictional)"',
      `"Generated","${basic(t0 + 3_600_000)}"`,
      '"Interval","1 s"',
      '',
      '"Timestamp","FD1 Level (mm)","FD1 Valve (%)"',
    ];
    for (let i = 0; i < series.timeS.length; i++) {
      lines.push(
        `"${basic(t0 + series.timeS[i] * 1000)}","${grouped(series.levelM[i] * 1000, 'comma')}","${i < 60 ? '0.0' : '100.0'}"`,
      );
    }
    const text = lines.join('\r\n') + '\r\n';
    const f = fit(text, 'historian.csv');
    expect(relErr(f.dischargeCoefficient!.value)).toBeLessThan(0.001);
    // the hint the old reader led to: naming the time column reads the same
    const named = fit(text, 'historian.csv', { timeColumn: 'Timestamp' });
    expect(named.dischargeCoefficient!.value).toBe(f.dischargeCoefficient!.value);
    const s = readLevelLog(enc(text), 'historian.csv');
    expect(s.metadata.map((m) => m.key)).toEqual(['Export', 'Generated', 'Interval']);
    expect(s.notes.find((n) => n.code === 'decimal')!.message).toMatch(
      /thousands grouped with a comma/,
    );
  });

  it('reads the other convention (2.099,9 in a semicolon file) and refuses a file that cannot tell', () => {
    const rows = ['Zeit;Pegel (mm)'];
    for (let i = 0; i < 20; i++)
      rows.push(`${basic(t0 + i * 1000)};${grouped(2099.9 - i * 3.1, 'dot')}`);
    const s = readLevelLog(enc(rows.join('\n')), 'dots.csv');
    expect(s.levelM[0]).toBeCloseTo(2.0999, 10);
    expect(s.levelM[19]).toBeCloseTo((2099.9 - 19 * 3.1) / 1000, 10);
    const ambiguous = [
      'time,level (mm)',
      ...Array.from(
        { length: 20 },
        (_, i) => `${basic(t0 + i * 1000)},"1,${String(200 + i).padStart(3, '0')}"`,
      ),
    ];
    expect(() => readLevelLog(enc(ambiguous.join('\n')), 'ambiguous.csv')).toThrow(
      /could have a decimal comma or a comma grouping thousands.*--decimal/,
    );
    const told = readLevelLog(enc(ambiguous.join('\n')), 'ambiguous.csv', { decimal: '.' });
    expect(told.levelM[0]).toBeCloseTo(1.2, 10);
  });

  describe('one row per time, tag and value', () => {
    const rows = ['TimeStamp,TagName,Value,Units,Quality'];
    for (let i = 0; i < series.timeS.length; i++) {
      const t = basic(t0 + series.timeS[i] * 1000);
      rows.push(`${t},FD1.OUTFLOW,${i < 60 ? 0 : (3.4 - i * 0.005).toFixed(3)},L/s,192`);
      rows.push(`${t},FD1.LEVEL,${(series.levelM[i] * 100).toFixed(3)},cm,192`);
      if (i % 10 === 0) rows.push(`${t},SITE.AIR_TEMP,${(11.5 + i * 0.001).toFixed(2)},degC,192`);
    }
    const text = rows.join('\n') + '\n';

    it('fits the named level tag within 0.1 % of the truth, with its unit from the unit column', () => {
      const f = fit(text, 'long.csv', { levelTag: 'FD1.LEVEL' });
      expect(relErr(f.dischargeCoefficient!.value)).toBeLessThan(0.001);
    });

    it('without the tag refuses, listing the tags; following the old hint (--level-column Value) never fits the wrong series', () => {
      for (const settings of [{}, { levelColumn: 'Value' }]) {
        let msg = '';
        try {
          fit(text, 'long.csv', settings);
        } catch (e) {
          msg = (e as Error).message;
        }
        expect(msg).toMatch(
          /3 tags.*"FD1\.OUTFLOW" \[L\/s\] \(361 rows\).*"FD1\.LEVEL" \[cm\] \(361 rows\).*--level-tag/,
        );
      }
      // naming a tag that is not a level refuses on its unit
      expect(() => fit(text, 'long.csv', { levelTag: 'FD1.OUTFLOW' })).toThrow(/unit "L\/s"/);
      expect(() => fit(text, 'long.csv', { levelTag: 'FD1.LVL' })).toThrow(/no tag "FD1.LVL"/);
    });

    it('an ordinary file with a text column and rows pasted twice is not taken for long format', () => {
      const wide = ['Time,Level (m),Status'];
      for (let i = 0; i < 20; i++)
        wide.push(`2026-03-01 10:00:${String(i).padStart(2, '0')},${(2 - i * 0.01).toFixed(3)},OK`);
      const s = readLevelLog(enc(wide.concat(wide.slice(1, 6)).join('\n')), 'pasted.csv');
      expect(s.tags).toBeUndefined();
      expect(s.levelM.length).toBe(20);
    });

    it('efflux inspect lists the tags with units and counts', () => {
      const dir = mkdtempSync(join(tmpdir(), 'efflux-tags-'));
      writeFileSync(join(dir, 'long.csv'), text);
      const r = efflux(['inspect', join(dir, 'long.csv'), '--json']);
      expect(r.code).toBe(0);
      expect(JSON.parse(r.stdout).tags).toEqual([
        { tag: 'FD1.OUTFLOW', unit: 'L/s', rows: 361 },
        { tag: 'FD1.LEVEL', unit: 'cm', rows: 361 },
        { tag: 'SITE.AIR_TEMP', unit: 'degC', rows: 37 },
      ]);
    });

    it('subtracts a barometric tag from an absolute-pressure tag of the same file', () => {
      const rho = 999.7; // water near 10 °C, kg/m³ (Kell 1975 table value, from memory)
      const g = 9.80665;
      const abs = ['time,tag,value,unit'];
      for (let i = 0; i < series.timeS.length; i++) {
        const t = basic(t0 + series.timeS[i] * 1000);
        const baroKPa = 100.8 + 0.0005 * i;
        abs.push(
          `${t},FD1.PT_ABS,${(baroKPa + (rho * g * series.levelM[i]) / 1000).toFixed(4)},kPa`,
        );
        abs.push(`${t},SITE.BARO,${baroKPa.toFixed(4)},kPa`);
      }
      const v = { ...vessel, fluid: { densityKgM3: rho } };
      const f = analyzeDrainTest({
        log: { bytes: enc(abs.join('\n')), fileName: 'abs.csv' },
        vessel: v,
        settings: { levelTag: 'FD1.PT_ABS', baroTag: 'SITE.BARO' },
      }).fit;
      expect(relErr(f.dischargeCoefficient!.value)).toBeLessThan(0.002);
    });
  });
});

describe('intervals stay in the valid range and a fit that says little is flagged', () => {
  it('a drain too short and noisy to tell Cd: the interval stays positive and the report flags it at the top', () => {
    // 40 s of a 300 s drain under 30 mm noise, with the sensor zero and an inflow fitted too:
    // Cd·a is poorly determined
    const noisy = simulateMessy({ ...drain, holdS: 0, drainS: 40, noiseM: 0.03, seed: 11 }).series;
    const rows = ['elapsed_s,level_m'];
    for (let i = 0; i < noisy.timeS.length; i++)
      rows.push(`${noisy.timeS[i]},${noisy.levelM[i].toFixed(4)}`);
    const f = fit(rows.join('\n'), 'short.csv', {
      window: '0..40',
      fitDatum: true,
      fitInflow: true,
    });
    expect(f.effectiveAreaM2.ci95![0]).toBeGreaterThan(0);
    expect(f.dischargeCoefficient!.ci95![0]).toBeGreaterThan(0);
    expect(f.warnings[0].code).toBe('interval-wider-than-value');
    expect(f.converged).toBe(true);
    expect(textReport(f).split('\n')[0]).toMatch(/^UNCERTAIN FIT: the 95 % interval of Cd·a/);
  });
});
