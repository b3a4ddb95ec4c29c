import type { LinearModel } from './linear.js';

/**
 * The linear model in three plain forms: JSON (the object itself), CSV (one row per matrix
 * entry, easy to load anywhere) and a text layout for people (linearModelText below).
 */
export function linearModelCsv(lm: LinearModel): string {
  const rows = ['matrix,row,column,value,standard_uncertainty,ci95_low,ci95_high'];
  const n = lm.ids.length;
  const put = (name: string, row: string, col: string, e: LinearModel['a'][number]) =>
    rows.push(
      [
        name,
        row,
        col,
        num(e.value),
        num(e.standardUncertainty),
        num(e.ci95?.[0] ?? null),
        num(e.ci95?.[1] ?? null),
      ].join(','),
    );
  for (let i = 0; i < n; i++)
    for (let j = 0; j < n; j++) put('A', lm.ids[i], lm.ids[j], lm.a[i * n + j]);
  for (let i = 0; i < n; i++)
    for (let j = 0; j < n; j++) put('B', lm.ids[i], `inflow:${lm.ids[j]}`, lm.b[i * n + j]);
  for (let i = 0; i < n; i++)
    put('C', lm.ids[i], lm.ids[i], { value: 1, standardUncertainty: 0, ci95: [1, 1] });
  for (let i = 0; i < n; i++) put('tau_s', lm.ids[i], '', lm.timeConstantsS[i]);
  for (let i = 0; i < n; i++)
    put('operating_level_m', lm.ids[i], '', {
      value: lm.operatingLevelsM[i],
      standardUncertainty: null,
      ci95: null,
    });
  return rows.join('\n') + '\n';
}

/**
 * The linear model as text: our own plain layout, one labelled table per matrix, rows and columns
 * named by the vessel they stand for, units in the headers. No matrix-literal syntax of any
 * numerical language (no brackets, no row separators): JSON and CSV are the forms for programs.
 */
export function linearModelText(lm: LinearModel): string {
  const n = lm.ids.length;
  const lines: string[] = [];
  lines.push('Linear model about the operating point');
  lines.push('  d(level change)/dt = A · (level changes) + B · (inflow changes)');
  lines.push('  states: each vessel’s level above its operating level, m');
  lines.push('  inputs: inflow into each vessel above its operating inflow, m³/s');
  lines.push('  outputs: the states themselves (each level is measured; no direct term)');
  lines.push('');
  lines.push('Operating point');
  lines.push(
    ...grid(
      ['vessel', 'inflow, L/s', 'level above its bottom, m'],
      lm.ids.map((id, i) => [
        id,
        (lm.inflowM3S[i] * 1000).toFixed(4),
        lm.operatingLevelsM[i].toFixed(4),
      ]),
    ),
  );
  const matrix = (title: string, corner: string, cols: string[], e: LinearModel['a']) => {
    lines.push('');
    lines.push(title);
    lines.push(
      ...grid(
        [corner, ...cols],
        lm.ids.map((id, i) => [
          id,
          ...Array.from({ length: n }, (_, j) => sci(e[i * n + j].value)),
        ]),
      ),
    );
    if (e.some((x) => x.standardUncertainty !== null)) {
      lines.push('');
      lines.push(`${title}: standard uncertainties`);
      lines.push(
        ...grid(
          [corner, ...cols],
          lm.ids.map((id, i) => [
            id,
            ...Array.from({ length: n }, (_, j) => {
              const u = e[i * n + j].standardUncertainty;
              return u === null ? '—' : sci(u);
            }),
          ]),
        ),
      );
    }
  };
  matrix(
    'A: how fast each level moves (row) per metre of level change in each vessel (column), 1/s',
    'level rate of',
    lm.ids.map((id) => `per m in ${id}, 1/s`),
    lm.a,
  );
  matrix(
    'B: how fast each level moves (row) per m³/s of extra inflow into each vessel (column), 1/m²',
    'level rate of',
    lm.ids.map((id) => `per m³/s into ${id}, 1/m²`),
    lm.b,
  );
  lines.push('');
  lines.push('Time constants, s');
  lines.push(
    ...grid(
      ['vessel', 'alone (−1/A of its own level), s', 'standard uncertainty, s', '95 % interval, s'],
      lm.timeConstantsS.map((t, i) => [
        lm.ids[i],
        t.value.toFixed(1),
        t.standardUncertainty === null ? '—' : t.standardUncertainty.toFixed(2),
        t.ci95 ? `${t.ci95[0].toFixed(1)} to ${t.ci95[1].toFixed(1)}` : '—',
      ]),
    ),
  );
  lines.push(
    `  coupled modes (−1 / real part of each eigenvalue of A), slowest first: ${lm.modeTimeConstantsS.map((t) => `${t.toFixed(1)} s`).join(', ')}`,
  );
  lines.push('');
  lines.push(
    'Engineering estimate from efflux; check it against site data before relying on it. For programs: --json or --csv.',
  );
  return lines.join('\n') + '\n';
}

/** A table with a rule under its header; the first column left-aligned, the rest right-aligned. */
function grid(header: string[], rows: string[][]): string[] {
  const widths = header.map((h, c) => Math.max(h.length, ...rows.map((r) => r[c].length)));
  const line = (cells: string[]) =>
    '  ' + cells.map((s, c) => (c === 0 ? s.padEnd(widths[c]) : s.padStart(widths[c]))).join('   ');
  return [line(header), '  ' + widths.map((w) => '-'.repeat(w)).join('   '), ...rows.map(line)];
}

function num(x: number | null): string {
  return x === null ? '' : String(Number(x.toPrecision(10)));
}

function sci(x: number): string {
  return x === 0 ? '0' : x.toExponential(5);
}
