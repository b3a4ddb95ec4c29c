import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import writeXlsxFile from 'write-excel-file/node';
import { analyzeDrainTest, expandWorkbook } from '../../../server/core/analyze.js';
import { InputError } from '../../../server/core/errors.js';
import { readLevelLog } from '../../../server/core/ingest/read-log.js';
import { workbookAsText } from '../../../server/core/ingest/workbook.js';
import { efflux, root } from '../../cli/run-cli.js';
import { multipart, testApp } from '../../http/helpers.js';

/**
 * Workbooks (.xlsx) read like text logs. The workbooks are written here with write-excel-file
 * (a dev dependency) from the invented demo logs in sample-data/.
 */
const sample = (name: string) => readFileSync(resolve(root, 'sample-data', name));
const r3Vessel = JSON.parse(sample('rinse-tank-r3.vessel.json').toString('utf8'));

type Cell = { value: unknown; type?: unknown; format?: string } | null;

/** r3-2026-03-19-semicolon.csv (dd.mm.yyyy hh:mm:ss;level cm with a decimal comma;status) as sheet rows. */
function r3Rows(): Cell[][] {
  const lines = sample('r3-2026-03-19-semicolon.csv').toString('utf8').trim().split(/\r?\n/);
  const rows: Cell[][] = [lines[0].split(';').map((h) => ({ value: h }))];
  for (const line of lines.slice(1)) {
    const [stamp, level, status] = line.split(';');
    const [d, t] = stamp.split(' ');
    const [dd, mm, yyyy] = d.split('.').map(Number);
    const [h, mi, s] = t.split(':').map(Number);
    rows.push([
      {
        value: new Date(Date.UTC(yyyy, mm - 1, dd, h, mi, s)),
        type: Date,
        format: 'dd.mm.yyyy hh:mm:ss',
      },
      { value: Number(level.replace(',', '.')), type: Number },
      { value: status, type: String },
    ]);
  }
  return rows;
}

async function xlsx(sheets: { name: string; rows: Cell[][] }[]): Promise<Uint8Array> {
  const buf = await writeXlsxFile(
    sheets.map((s) => ({ data: s.rows as never, sheet: s.name })) as never,
  ).toBuffer();
  return new Uint8Array(buf);
}

const fitOf = async (bytes: Uint8Array, fileName: string, settings = {}) =>
  analyzeDrainTest(await expandWorkbook({ log: { bytes, fileName }, vessel: r3Vessel, settings }))
    .fit;

describe('.xlsx workbooks', () => {
  it('a workbook made from a demo log fits to the same Cd as the CSV, dates as date cells', async () => {
    const book = await xlsx([{ name: 'Log', rows: r3Rows() }]);
    const fromBook = await fitOf(book, 'r3.xlsx');
    const fromCsv = await fitOf(sample('r3-2026-03-19-semicolon.csv'), 'r3.csv');
    // a workbook keeps times as fractional days in binary floating point; they come back within a
    // millisecond of the text's, so Cd agrees to far better than its uncertainty (here 1e-8 relative)
    expect(
      Math.abs(fromBook.dischargeCoefficient!.value / fromCsv.dischargeCoefficient!.value - 1),
    ).toBeLessThan(1e-8);
    expect(fromBook.window.startS).toBeCloseTo(fromCsv.window.startS, 2);
  });

  it('reads the first sheet by default or the one named; refuses a missing one, listing the sheets', async () => {
    const notes: Cell[][] = [[{ value: 'Drain test R-3, invented for the tests' }]];
    const book = await xlsx([
      { name: 'Notes', rows: notes },
      { name: 'Log', rows: r3Rows() },
    ]);
    await expect(fitOf(book, 'two.xlsx')).rejects.toThrow(InputError);
    const named = await fitOf(book, 'two.xlsx', { sheet: 'log' });
    expect(named.converged).toBe(true);
    await expect(workbookAsText(book, 'two.xlsx', 'Data')).rejects.toThrow(
      /no sheet named "Data" \(sheets: "Notes", "Log"\)/,
    );
  });

  it('spreadsheet serial dates written as plain numbers are recognised as in a text log', async () => {
    const lines = sample('r3-2026-03-25-serial-days.csv').toString('utf8').trim().split(/\r?\n/);
    const rows: Cell[][] = [lines[0].split(',').map((h) => ({ value: h }))];
    for (const l of lines.slice(1))
      rows.push(l.split(',').map((v) => ({ value: Number(v), type: Number })));
    const text = (await workbookAsText(await xlsx([{ name: 'S', rows }]), 'serial.xlsx')).bytes;
    const s = readLevelLog(text, 'serial.xlsx');
    const c = readLevelLog(sample('r3-2026-03-25-serial-days.csv'), 'serial.csv');
    expect(s.notes.some((n) => /spreadsheet serial day numbers/.test(n.message))).toBe(true);
    expect(s.t0EpochMs).toBe(c.t0EpochMs);
    expect(Array.from(s.levelM)).toEqual(Array.from(c.levelM));
  });

  it('refuses a damaged workbook, a zip that is no workbook, and one over the size limit', async () => {
    const book = await xlsx([{ name: 'Log', rows: r3Rows() }]);
    await expect(
      workbookAsText(book.subarray(0, Math.floor(book.length / 2)), 'cut.xlsx'),
    ).rejects.toThrow(/cannot be read|not an \.xlsx/);
    await expect(workbookAsText(book, 'big.xlsx', undefined, 1000)).rejects.toThrow(
      /more than the 1000 allowed/,
    );
    const zip = new Uint8Array([
      0x50,
      0x4b,
      0x03,
      0x04,
      ...new TextEncoder().encode('word/document.xml'),
    ]);
    await expect(workbookAsText(zip, 'a.docx')).rejects.toThrow(/not an \.xlsx workbook/);
    // read directly (without the expansion step) a workbook is named as such, not "binary content"
    expect(() => readLevelLog(book, 'r3.xlsx')).toThrow(/workbook/);
  });

  it('the CLI fits a workbook and exits 2 for a damaged one', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'efflux-xlsx-'));
    const book = await xlsx([{ name: 'Log', rows: r3Rows() }]);
    writeFileSync(join(dir, 'r3.xlsx'), book);
    writeFileSync(join(dir, 'cut.xlsx'), book.subarray(0, 2000));
    writeFileSync(join(dir, 'v.json'), JSON.stringify(r3Vessel));
    const ok = efflux(['fit', join(dir, 'r3.xlsx'), '--vessel', join(dir, 'v.json'), '--json']);
    expect(ok.code).toBe(0);
    expect(Math.abs(JSON.parse(ok.stdout).dischargeCoefficient.value / 0.605 - 1)).toBeLessThan(
      0.005,
    );
    const bad = efflux(['fit', join(dir, 'cut.xlsx'), '--vessel', join(dir, 'v.json')]);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/cut\.xlsx.*(cannot be read|not an \.xlsx)/);
  });

  it('the API takes a workbook upload (stored as sent) and answers 422 for a damaged one', async () => {
    const t = await testApp({
      analyze: async (req) => analyzeDrainTest(await expandWorkbook(req)),
    });
    const v = await t.app.inject({
      method: 'POST',
      url: '/api/vessels',
      headers: t.auth('engineer'),
      payload: r3Vessel,
    });
    expect(v.statusCode).toBe(201);
    const book = await xlsx([
      { name: 'Notes', rows: [[{ value: 'invented' }]] },
      { name: 'Log', rows: r3Rows() },
    ]);
    const send = (bytes: Uint8Array, fields: Record<string, string>) => {
      const m = multipart([{ field: 'log', name: 'r3.xlsx', bytes }], fields);
      return t.app.inject({
        method: 'POST',
        url: `/api/vessels/${v.json().id}/tests`,
        headers: { ...t.auth('technician'), ...m.headers },
        payload: m.payload,
      });
    };
    const res = await send(book, { sheet: 'Log' });
    expect(res.statusCode).toBe(201);
    expect(res.json().test.size).toBe(book.length);
    expect(res.json().test.settings).toEqual({ sheet: 'Log' });
    const bad = await send(book.subarray(0, 3000), {});
    expect(bad.statusCode).toBe(422);
    expect(bad.headers['content-type']).toMatch(/problem\+json/);
  });
});
