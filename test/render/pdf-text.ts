/**
 * Checks that a rendered PDF report reads as written for a person, for any report (fit, outlet,
 * connected-vessel): no JSON, no internal field names (the list is derived from the schemas' keys,
 * so a new field is covered without editing a list here), a status mark on every page, and — from
 * poppler's word positions (pdftotext -bbox-layout) — every figure on one page with its caption and
 * every table header with rows under it, where the layout helper (server/render/pdf-layout.ts) says
 * it put them. Needs poppler-utils (see pdf-tools.ts, havePoppler).
 */
import { spawnSync } from 'node:child_process';
import type { z } from 'zod';
import { singleFitResult, jointFitResult } from '../../server/core/fit-result/schema.js';
import { vesselSchema } from '../../server/core/vessel/schema.js';
import { analysisSettings } from '../../server/http/schemas.js';
import type { LayoutEntry } from '../../server/render/pdf-layout.js';

export interface PdfLine {
  text: string;
  xMin: number;
  yMin: number;
  xMax: number;
  yMax: number;
}
export interface PdfPage {
  width: number;
  height: number;
  lines: PdfLine[];
  text: string;
}

const unescapeXml = (s: string) =>
  s
    .replace(/&lt;/g, '<')
    .replace(/&gt;/g, '>')
    .replace(/&quot;/g, '"')
    .replace(/&#39;|&apos;/g, "'")
    .replace(/&amp;/g, '&');

/** Pages with their text lines and positions (points, y from the top), from pdftotext -bbox-layout. */
export function pdfPages(file: string): PdfPage[] {
  const r = spawnSync('pdftotext', ['-bbox-layout', file, '-'], {
    encoding: 'utf8',
    maxBuffer: 64 << 20,
  });
  if (r.status !== 0) throw new Error(`pdftotext -bbox-layout failed: ${r.stderr}`);
  const pages: PdfPage[] = [];
  const attrs = (tag: string) =>
    Object.fromEntries([...tag.matchAll(/(\w+)="([^"]*)"/g)].map((m) => [m[1], m[2]]));
  for (const p of r.stdout.split(/<page /).slice(1)) {
    const a = attrs(p.slice(0, p.indexOf('>')));
    const lines: PdfLine[] = [];
    for (const m of p.matchAll(/<line ([^>]*)>([\s\S]*?)<\/line>/g)) {
      const la = attrs(m[1]);
      const words = [...m[2].matchAll(/<word [^>]*>([\s\S]*?)<\/word>/g)].map((w) =>
        unescapeXml(w[1]),
      );
      lines.push({
        text: words.join(' '),
        xMin: +la.xMin,
        yMin: +la.yMin,
        xMax: +la.xMax,
        yMax: +la.yMax,
      });
    }
    pages.push({
      width: +a.width,
      height: +a.height,
      lines,
      text: lines.map((l) => l.text).join('\n'),
    });
  }
  return pages;
}

/** Every key of a zod schema, all the way down (objects, unions, arrays, tuples, wrappers). */
export function schemaKeys(schema: z.ZodType, into = new Set<string>()): Set<string> {
  const seen = new Set<unknown>();
  const walk = (s: unknown) => {
    if (!s || typeof s !== 'object' || seen.has(s)) return;
    seen.add(s);
    const def = (s as { _zod?: { def?: Record<string, any> } })._zod?.def;
    if (!def) return;
    if (def.shape)
      for (const [k, v] of Object.entries(def.shape as Record<string, unknown>)) {
        into.add(k);
        walk(v);
      }
    for (const key of ['innerType', 'element', 'in', 'out', 'valueType', 'left', 'right', 'rest'])
      walk(def[key]);
    for (const key of ['options', 'items']) if (Array.isArray(def[key])) def[key].forEach(walk);
    if (typeof def.getter === 'function') walk(def.getter());
  };
  walk(schema);
  return into;
}

/**
 * The names a reader must not meet: every camelCase key of the vessel file, the analysis settings
 * and the fit results, plus any names given (parameter names read from the rendered fits).
 */
export function internalNames(extra: Iterable<string> = []): string[] {
  const keys = new Set<string>();
  for (const s of [vesselSchema, analysisSettings, singleFitResult, jointFitResult])
    schemaKeys(s as unknown as z.ZodType, keys);
  for (const e of extra) keys.add(e);
  return [...keys].filter((k) => /[a-z][A-Z]|[a-z][0-9][A-Z]?$/.test(k)).sort();
}

export interface TextProblem {
  page: number;
  what: string;
}

/**
 * What in a report's text a reader should not see: JSON (`{"`), internal names (whole words), and,
 * when `mark` is given, a page without that status word.
 */
export function reportTextProblems(
  pages: PdfPage[],
  opts: { names: string[]; mark?: string },
): TextProblem[] {
  const problems: TextProblem[] = [];
  const nameRe = opts.names.length
    ? new RegExp(`(?<![A-Za-z0-9_])(${opts.names.join('|')})(?![A-Za-z0-9_])`, 'g')
    : null;
  pages.forEach((p, i) => {
    const page = i + 1;
    if (p.text.includes('{"')) problems.push({ page, what: 'JSON text ({")' });
    for (const m of nameRe ? p.text.matchAll(nameRe) : [])
      problems.push({ page, what: `internal name "${m[1]}"` });
    if (opts.mark && !new RegExp(`\\b${opts.mark}\\b`).test(p.text))
      problems.push({ page, what: `no ${opts.mark} mark` });
  });
  return problems;
}

/** The first few words of a text, the way pdftotext joins a line's words. */
const opening = (s: string, words = 4) => s.split(/\s+/).filter(Boolean).slice(0, words).join(' ');

function findLine(page: PdfPage, text: string, top: number, bottom: number): PdfLine | undefined {
  const want = opening(text);
  return page.lines.find(
    (l) => l.text.startsWith(want) && l.yMin >= top - 2 && l.yMax <= bottom + 2,
  );
}

/**
 * Checks the layout helper's record against the rendered pages: each figure's title and caption
 * found on the recorded page inside the recorded band (so chart and caption share a page); each
 * table header found where recorded, with at least two rows under it on that page unless the
 * table had fewer rows left, and never in the last line of a page.
 */
export function layoutProblems(pages: PdfPage[], layout: LayoutEntry[]): string[] {
  const problems: string[] = [];
  for (const e of layout) {
    const page = pages[e.page];
    if (!page) {
      problems.push(`${e.kind} "${e.title}": page ${e.page + 1} is not in the PDF`);
      continue;
    }
    const where = `page ${e.page + 1}`;
    const contentBottom = page.height - 50; // the footer rule sits at the bottom margin
    if (e.bottom > contentBottom + 1)
      problems.push(`${e.kind} "${e.title}" runs into the footer on ${where}`);
    if (e.kind === 'figure') {
      const title = findLine(page, e.title, e.top, e.bottom);
      const caption = findLine(page, e.caption, e.top, e.bottom);
      if (!title) problems.push(`figure "${e.title}": title not found on ${where}`);
      if (!caption) problems.push(`figure "${e.title}": caption not found on ${where}`);
      if (title && caption && caption.yMin <= title.yMax)
        problems.push(`figure "${e.title}": caption above its title`);
    } else {
      const header = page.lines.find(
        (l) => l.text.startsWith(opening(e.title, 2)) && Math.abs(l.yMin - e.top) < 8,
      );
      if (!header) {
        problems.push(`table header "${e.title}" not found near y ${e.top} on ${where}`);
        continue;
      }
      const below = e.rowsBelow.filter((cell) =>
        page.lines.some((l) => l.yMin > header.yMax - 1 && l.text.startsWith(opening(cell, 1))),
      );
      // two rows, or the one row left of the table after a break (an empty header needs two)
      const needed = Math.min(2, e.rowsBelow.length || 2);
      if (e.rowsBelow.length < needed || below.length < needed)
        problems.push(
          `table header "${e.title}" on ${where} has ${below.length} row(s) under it on the page`,
        );
    }
  }
  return problems;
}
