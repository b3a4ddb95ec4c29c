import type { FitJson } from '../core/analysis-contract.js';
import { axes, escapeXml, extent, linearScale, polyline } from './svg-chart.js';
import { countText } from '../core/format/words.js';

/**
 * A picture of one fit for the technician with no server at hand: the whole log with the fitted
 * window shaded, the data and the fitted curve over it, and the residuals below.
 */
interface PlotBlock {
  log: { timeS: number[]; levelM: number[] };
  window: { offsetS: number; timeS: number[]; observedM: number[]; fittedM: number[] };
}

export function fitSvg(fit: FitJson): string {
  const plot = fit.plot as PlotBlock;
  const W = 900;
  const H = 620;
  const top = { x: 70, y: 50, width: 800, height: 330 };
  const bottom = { x: 70, y: 440, width: 800, height: 120 };
  const winT = plot.window.timeS.map((t) => t + plot.window.offsetS);
  const [t0, t1] = extent(plot.log.timeS, winT);
  const sx = linearScale(t0, t1, top.x, top.x + top.width);
  const [y0, y1] = extent(plot.log.levelM, plot.window.fittedM);
  const sy = linearScale(y0, y1, top.y + top.height, top.y);
  const resid = plot.window.observedM.map((v, i) => (v - plot.window.fittedM[i]) * 1000);
  const rMax = Math.max(1e-3, ...resid.map((r) => (Number.isFinite(r) ? Math.abs(r) : 0))) * 1.1;
  const sxr = linearScale(t0, t1, bottom.x, bottom.x + bottom.width);
  const syr = linearScale(-rMax, rMax, bottom.y + bottom.height, bottom.y);
  const ws = sx(fit.window.startS);
  const we = sx(fit.window.endS);
  const cd = fit.dischargeCoefficient;
  const ea = fit.effectiveAreaM2;
  const title = cd
    ? `Cd = ${cd.value.toFixed(4)} ± ${(cd as { expandedUncertainty?: number }).expandedUncertainty?.toFixed(4) ?? '—'} (95 %)   Cd·a = ${ea.value.toExponential(4)} m²`
    : `Cd·a = ${ea.value.toExponential(4)} m²`;
  const vesselName = (fit.vessel as { name?: string } | undefined)?.name ?? '';
  const parts = [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}" font-family="DejaVu Sans, Arial, sans-serif">`,
    `<rect width="${W}" height="${H}" fill="#ffffff"/>`,
    `<text x="${top.x}" y="22" font-size="15" fill="#111">${escapeXml(`Drain test fit — ${vesselName}`)}</text>`,
    `<text x="${top.x}" y="40" font-size="12" fill="#333">${escapeXml(title)}</text>`,
    axes(top, sx, sy, 'time from the log’s start (s)', 'level reading (m)'),
    `<rect x="${ws.toFixed(1)}" y="${top.y}" width="${Math.max(we - ws, 1).toFixed(1)}" height="${top.height}" fill="#f3d9a4" fill-opacity="0.45"/>`,
    polyline(plot.log.timeS, plot.log.levelM, sx, sy, 'stroke="#7d8796" stroke-width="1"'),
    polyline(winT, plot.window.fittedM, sx, sy, 'stroke="#0b6e69" stroke-width="2.2"'),
    `<text x="${(ws + 4).toFixed(1)}" y="${top.y + 14}" font-size="10" fill="#7a5410">fitted window</text>`,
    legend(top.x + top.width - 190, top.y + 12),
    axes(bottom, sxr, syr, 'time from the log’s start (s)', 'residual (mm)'),
    `<line x1="${bottom.x}" y1="${syr(0).toFixed(1)}" x2="${bottom.x + bottom.width}" y2="${syr(0).toFixed(1)}" stroke="#0b6e69" stroke-width="1"/>`,
    polyline(winT, resid, sxr, syr, 'stroke="#9b3d2e" stroke-width="0.8"'),
    `<text x="${top.x}" y="${H - 8}" font-size="9" fill="#666">${escapeXml(`${countText(fit.warnings.length, 'warning')}; engine ${fit.engineVersion}. Engineering estimate, not a certification.`)}</text>`,
    '</svg>',
  ];
  return parts.join('\n') + '\n';
}

function legend(x: number, y: number): string {
  return [
    `<rect x="${x - 8}" y="${y - 10}" width="186" height="38" fill="#ffffff" fill-opacity="0.85" stroke="#c9c6bd"/>`,
    `<line x1="${x}" y1="${y}" x2="${x + 22}" y2="${y}" stroke="#7d8796" stroke-width="1.5"/><text x="${x + 28}" y="${y + 3}" font-size="10">logged level</text>`,
    `<line x1="${x}" y1="${y + 16}" x2="${x + 22}" y2="${y + 16}" stroke="#0b6e69" stroke-width="2.2"/><text x="${x + 28}" y="${y + 19}" font-size="10">fitted drain model</text>`,
  ].join('');
}
