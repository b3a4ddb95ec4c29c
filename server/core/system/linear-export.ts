import type { LinearModel } from './linear.js';

/**
 * The linear model in three plain forms: JSON (the object itself), CSV (one row per matrix
 * entry, easy to load anywhere) and a text block a control engineer can paste into a script or
 * a design note: matrices row by row with the state and input names, then the time constants.
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

export function linearModelText(lm: LinearModel): string {
  const n = lm.ids.length;
  const lines: string[] = [];
  lines.push('# linear model dx/dt = A x + B u, y = C x (C = I, D = 0)');
  lines.push(`# states x: level deviations (m) of ${lm.ids.join(', ')}`);
  lines.push(`# inputs u: extra inflow (m3/s) into ${lm.ids.join(', ')}`);
  lines.push(
    `# operating point: inflow ${lm.inflowM3S.map((q) => num(q)).join(', ')} m3/s; levels ${lm.operatingLevelsM.map((x) => x.toFixed(4)).join(', ')} m`,
  );
  const matrix = (name: string, unit: string, e: LinearModel['a']) => {
    lines.push(`${name} = [  # ${unit}`);
    for (let i = 0; i < n; i++)
      lines.push(
        '  ' +
          Array.from({ length: n }, (_, j) => fixed(e[i * n + j].value)).join(' ') +
          (i < n - 1 ? ';' : ''),
      );
    lines.push(']');
    if (e.some((x) => x.standardUncertainty !== null)) {
      lines.push(`u_${name} = [  # standard uncertainties, ${unit}`);
      for (let i = 0; i < n; i++)
        lines.push(
          '  ' +
            Array.from({ length: n }, (_, j) => fixed(e[i * n + j].standardUncertainty ?? 0)).join(
              ' ',
            ) +
            (i < n - 1 ? ';' : ''),
        );
      lines.push(']');
    }
  };
  matrix('A', '1/s', lm.a);
  matrix('B', '1/m2', lm.b);
  lines.push(`C = eye(${n})`);
  lines.push('# time constants (each vessel alone, -1/A_ii), s:');
  lm.timeConstantsS.forEach((t, i) => {
    const ci = t.ci95 ? ` (95 % ${t.ci95[0].toFixed(1)} .. ${t.ci95[1].toFixed(1)})` : '';
    lines.push(
      `#   ${lm.ids[i]}: ${t.value.toFixed(1)}${t.standardUncertainty !== null ? ` ± ${t.standardUncertainty.toFixed(2)}` : ''}${ci}`,
    );
  });
  lines.push(
    `# coupled modes, -1/Re(eigenvalue), s: ${lm.modeTimeConstantsS.map((t) => t.toFixed(1)).join(', ')}`,
  );
  lines.push('# engineering estimate from efflux; check against site data before relying on it');
  return lines.join('\n') + '\n';
}

function num(x: number | null): string {
  return x === null ? '' : String(Number(x.toPrecision(10)));
}

function fixed(x: number): string {
  return x.toExponential(6).padStart(14);
}
