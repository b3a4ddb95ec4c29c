import { STANDARD_GRAVITY_MS2, waterDensityKgM3 } from '../core/units/index.js';
import type { DemoTest, DemoVessel, Layout } from './scenario.js';
import { SITE } from './scenario.js';

/**
 * Writes a simulated log in one of several invented logger layouts (none copies a real logger's
 * or vendor's format). Readings arrive as level above the sensor zero, in metres.
 */
export interface LogText {
  text: string;
  encoding: 'utf8' | 'utf16le';
  baro?: string;
}

const pad2 = (n: number) => String(n).padStart(2, '0');
const isoSecond = (ms: number) => new Date(Math.round(ms)).toISOString().replace('.000Z', 'Z');
const comma = (x: number, d: number) => x.toFixed(d).replace('.', ',');

function parts(ms: number, offsetMin = 0) {
  const d = new Date(ms + offsetMin * 60000);
  return {
    y: d.getUTCFullYear(),
    mo: d.getUTCMonth() + 1,
    d: d.getUTCDate(),
    h: d.getUTCHours(),
    mi: d.getUTCMinutes(),
    s: d.getUTCSeconds(),
  };
}

/** A barometer that drifts slowly through the morning (invented), kPa. */
export function baroKpa(ms: number): number {
  const hours = (ms / 3.6e6) % 24;
  return 101.2 + 0.15 * Math.sin((2 * Math.PI * hours) / 12);
}

export function writeLog(
  test: DemoTest,
  vessel: DemoVessel,
  timeS: Float64Array,
  levelM: Float64Array,
): LogText {
  const t0 = Date.parse(test.startIso);
  const ms = (i: number) => t0 + timeS[i] * 1000;
  const n = timeS.length;
  const rows: string[] = [];
  const layout: Layout = test.layout;
  const tempC = vessel.fluid && 'temperatureC' in vessel.fluid ? vessel.fluid.temperatureC : 20;
  const rho = waterDensityKgM3(tempC);
  const g = STANDARD_GRAVITY_MS2;
  switch (layout) {
    case 'preamble-iso-m':
      rows.push(
        `Site: ${SITE}`,
        `Vessel: ${vessel.name}`,
        `Logger: ${test.loggerId}`,
        `Operator: ${test.operator}`,
        'Record: drain test, level above the drain centreline',
        '',
      );
      rows.push('timestamp,level (m)');
      for (let i = 0; i < n; i++) rows.push(`${isoSecond(ms(i))},${levelM[i].toFixed(4)}`);
      break;
    case 'semicolon-comma-dmy-cm':
      rows.push('Date/time;Level [cm];Status');
      for (let i = 0; i < n; i++) {
        const p = parts(ms(i));
        rows.push(
          `${pad2(p.d)}.${pad2(p.mo)}.${p.y} ${pad2(p.h)}:${pad2(p.mi)}:${pad2(p.s)};${comma(levelM[i] * 100, 1)};OK`,
        );
      }
      break;
    case 'mdy-12h-ft':
      rows.push('Date Time,Level (ft)');
      for (let i = 0; i < n; i++) {
        const p = parts(ms(i));
        const h12 = p.h % 12 === 0 ? 12 : p.h % 12;
        rows.push(
          `${pad2(p.mo)}/${pad2(p.d)}/${p.y} ${h12}:${pad2(p.mi)}:${pad2(p.s)} ${p.h < 12 ? 'AM' : 'PM'},${(levelM[i] / 0.3048).toFixed(4)}`,
        );
      }
      break;
    case 'epoch-gauge-kpa-tempf': {
      rows.push('epoch_s,P_gauge (kPa),Water temp (°F)');
      const tempF = tempC * 1.8 + 32;
      for (let i = 0; i < n; i++)
        rows.push(
          `${Math.round(ms(i) / 1000)},${((rho * g * levelM[i]) / 1000).toFixed(3)},${tempF.toFixed(1)}`,
        );
      break;
    }
    case 'elapsed-mm':
      rows.push('Elapsed (s),Level_mm');
      for (let i = 0; i < n; i++)
        rows.push(`${timeS[i].toFixed(0)},${(levelM[i] * 1000).toFixed(0)}`);
      return { text: rows.join('\r\n') + '\r\n', encoding: 'utf16le' };
    case 'date-time-columns-abs-kpa': {
      rows.push('Date,Time,Pabs (kPa)');
      for (let i = 0; i < n; i++) {
        const p = parts(ms(i));
        rows.push(
          `${p.y}-${pad2(p.mo)}-${pad2(p.d)},${pad2(p.h)}:${pad2(p.mi)}:${pad2(p.s)},${((rho * g * levelM[i]) / 1000 + baroKpa(ms(i))).toFixed(3)}`,
        );
      }
      const baro = ['Date,Time,Baro (kPa)'];
      for (let t = t0 - 600_000; t <= ms(n - 1) + 600_000; t += 60_000) {
        const p = parts(t);
        baro.push(
          `${p.y}-${pad2(p.mo)}-${pad2(p.d)},${pad2(p.h)}:${pad2(p.mi)}:${pad2(p.s)},${baroKpa(t).toFixed(3)}`,
        );
      }
      return { text: rows.join('\n') + '\n', encoding: 'utf8', baro: baro.join('\n') + '\n' };
    }
    case 'radar-distance-iso-offset': {
      rows.push('Time,Distance to surface (m)');
      const mount = vessel.sensor?.mountElevationM ?? 0;
      for (let i = 0; i < n; i++) {
        const p = parts(ms(i), 60);
        rows.push(
          `${p.y}-${pad2(p.mo)}-${pad2(p.d)}T${pad2(p.h)}:${pad2(p.mi)}:${pad2(p.s)}+01:00,${(mount - levelM[i]).toFixed(3)}`,
        );
      }
      break;
    }
    case 'tab-local-zone-fill-hold':
      // Lisbon in June is UTC+1 (summer time); the file carries no offset
      rows.push('Local time\tStage (m)\tPump');
      for (let i = 0; i < n; i++) {
        const p = parts(ms(i), 60);
        rows.push(
          `${p.y}-${pad2(p.mo)}-${pad2(p.d)} ${pad2(p.h)}:${pad2(p.mi)}:${pad2(p.s)}\t${levelM[i].toFixed(3)}\t${i % 600 < 300 ? 'off' : 'off'}`,
        );
      }
      break;
    case 'serial-days-duplicates': {
      rows.push('Serial date,Level (cm)');
      const serial = (t: number) => t / 86_400_000 + 25569; // days since 1899-12-30 (1900 date system)
      for (let i = 0; i < n; i++) {
        rows.push(`${serial(ms(i)).toFixed(8)},${(levelM[i] * 100).toFixed(1)}`);
        if (i % 97 === 50) rows.push(rows[rows.length - 1]); // pasted twice
      }
      // two rows out of order, as after a sort on the wrong column
      const a = 1 + Math.floor(rows.length / 3);
      [rows[a], rows[a + 1]] = [rows[a + 1], rows[a]];
      break;
    }
    case 'history-elapsed-m':
      // small monthly logs: one line saying when, then elapsed seconds and level in m
      rows.push(`Vessel: ${vessel.name}`, `Started: ${isoSecond(t0)}`, '');
      rows.push('Elapsed (s),Level (m)');
      for (let i = 0; i < n; i++) rows.push(`${timeS[i].toFixed(0)},${levelM[i].toFixed(4)}`);
      break;
    case 'pipe-epoch-ms-inflow':
      rows.push('epoch_ms|level_m');
      for (let i = 0; i < n; i++) rows.push(`${Math.round(ms(i))}|${levelM[i].toFixed(4)}`);
      break;
  }
  return { text: rows.join('\n') + '\n', encoding: 'utf8' };
}
