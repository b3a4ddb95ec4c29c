/**
 * Reads a report back: a JSON report as it is, a PDF report through its info dictionary (the
 * Efflux* entries) and the attached report.json. Only what our own writer produces is understood.
 */
import { inflateSync } from 'node:zlib';
import { InputError } from '../core/errors.js';

export interface ReportFile {
  type: 'pdf' | 'json';
  kind: 'fit' | 'outlet';
  reportId: string;
  contentSha256: string;
  /** The report as JSON (from the file, or from the PDF's attachment), null if absent. */
  report: Record<string, any> | null;
  info: Record<string, string>;
}

/** PDF literal string → text (ASCII values; our writer puts nothing else in the Efflux* entries). */
function pdfString(s: string): string {
  return s.replace(/\\([nrtbf()\\]|[0-7]{1,3})/g, (_m, c: string) => {
    const map: Record<string, string> = {
      n: '\n',
      r: '\r',
      t: '\t',
      b: '\b',
      f: '\f',
      '(': '(',
      ')': ')',
      '\\': '\\',
    };
    return map[c] ?? String.fromCharCode(parseInt(c, 8));
  });
}

const LITERAL = String.raw`\(((?:\\.|[^\\)])*)\)`;

/** Info entries are written directly or (pdfkit) as references to string objects: read both. */
function infoOf(text: string): Record<string, string> {
  const info: Record<string, string> = {};
  for (const m of text.matchAll(
    new RegExp(String.raw`/(Efflux[A-Za-z0-9]+|Keywords|Title)\s*(?:${LITERAL}|(\d+) 0 R)`, 'g'),
  )) {
    if (m[2] !== undefined) info[m[1]] = pdfString(m[2]);
    else {
      const obj = new RegExp(String.raw`(?:^|\s)${m[3]} 0 obj\s*${LITERAL}\s*endobj`).exec(text);
      if (obj) info[m[1]] = pdfString(obj[1]);
    }
  }
  return info;
}

function attachment(buf: Buffer, text: string): string | null {
  for (const m of text.matchAll(/\d+ 0 obj\s*<<([\s\S]*?)>>\s*stream\r?\n/g)) {
    const dict = m[1];
    if (dict.includes('endobj') || !/\/Type\s*\/EmbeddedFile\b/.test(dict)) continue;
    const len = /\/Length\s+(\d+)/.exec(dict);
    if (!len) continue;
    const start = m.index! + m[0].length;
    const raw = buf.subarray(start, start + Number(len[1]));
    try {
      return (dict.includes('/FlateDecode') ? inflateSync(raw) : raw).toString('utf8');
    } catch {
      return null;
    }
  }
  return null;
}

export function readReportFile(bytes: Buffer, fileName: string): ReportFile {
  const head = bytes.subarray(0, 5).toString('latin1');
  if (head === '%PDF-') {
    const text = bytes.toString('latin1');
    const info = infoOf(text);
    if (
      !info.EffluxReportId ||
      !info.EffluxContentSha256 ||
      (info.EffluxReportKind !== 'fit' && info.EffluxReportKind !== 'outlet')
    ) {
      throw new InputError('not an efflux report: the PDF carries no report id and content hash', {
        file: fileName,
      });
    }
    const json = attachment(bytes, text);
    let report: Record<string, any> | null = null;
    try {
      report = json ? JSON.parse(json) : null;
    } catch {
      report = null;
    }
    return {
      type: 'pdf',
      kind: info.EffluxReportKind,
      reportId: info.EffluxReportId,
      contentSha256: info.EffluxContentSha256,
      report,
      info,
    };
  }
  let report: Record<string, any>;
  try {
    report = JSON.parse(bytes.toString('utf8'));
  } catch {
    throw new InputError('neither a PDF nor JSON', { file: fileName });
  }
  const kind =
    report?.format === 'efflux-fit-report'
      ? 'fit'
      : report?.format === 'efflux-outlet-report'
        ? 'outlet'
        : null;
  if (!kind || typeof report.reportId !== 'string' || typeof report.contentSha256 !== 'string') {
    throw new InputError('not an efflux report (format, reportId or contentSha256 missing)', {
      file: fileName,
    });
  }
  return {
    type: 'json',
    kind,
    reportId: report.reportId,
    contentSha256: report.contentSha256,
    report,
    info: {},
  };
}
