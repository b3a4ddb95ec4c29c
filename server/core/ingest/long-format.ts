/**
 * Long-format exports (one row per time, tag and value, as plant historians write them): which
 * column names the tag, which gives its unit, and which tags the file holds with how many rows.
 * The level (and barometric) series is then the rows of one named tag; nothing is guessed when
 * several tags could be the level: the person names it (--level-tag), so a hint can never lead
 * to fitting the wrong series.
 */
import { InputError } from '../errors.js';
import { isDataCell, type Layout } from './layout.js';
import { forEachRow, type RowSource } from './rows.js';

export interface TagSummary {
  tag: string;
  /** The unit the file gives for the tag (its unit column), or null. */
  unit: string | null;
  rows: number;
}

export interface TagColumns {
  tagCol: number;
  unitCol: number;
}

const TAG_WORDS =
  /^(tag|tags|tagname|tag name|tag id|tagid|name|point|point name|pointname|signal|variable|channel|item|parameter|series|sensor|measurement)$/i;
const UNIT_WORDS = /^(unit|units|uom|eu|eng units|engineering units|engunits|unit of measure)$/i;

/** Words, not a number or a date and time ("11:59 PM" and "20260611T070000Z" have letters too). */
function isText(f: string): boolean {
  const t = f.trim();
  return t !== '' && /[A-Za-z_]/.test(t) && !isDataCell(t);
}

/**
 * The tag and unit columns of a long-format file, or null for an ordinary (wide) file: a column
 * of text whose header names a tag, or any column of text while the first rows repeat a time
 * in the column that looks like time.
 */
export function findTagColumns(layout: Layout): TagColumns | null {
  const n = layout.fieldCount;
  // the time column, roughly: the first whose first cell looks like a date or clock time
  const timeCol = layout.names.findIndex((_, c) =>
    /\d[-:/.T]\d|^\s*\d{8}T/.test(layout.sample[0]?.fields[c] ?? ''),
  );
  const textCols: number[] = [];
  for (let c = 0; c < n; c++) {
    if (c === timeCol) continue;
    const cells = layout.sample.map((r) => r.fields[c] ?? '').filter((f) => f.trim() !== '');
    if (cells.length && cells.filter(isText).length * 2 > cells.length) textCols.push(c);
  }
  const unitCol = textCols.find((c) => UNIT_WORDS.test(layout.names[c].trim())) ?? -1;
  const candidates = textCols.filter((c) => c !== unitCol);
  const named = candidates.find((c) => TAG_WORDS.test(layout.names[c].trim()));
  if (named !== undefined) return { tagCol: named, unitCol };
  if (timeCol < 0 || candidates.length === 0) return null;
  const times = layout.sample.map((r) => (r.fields[timeCol] ?? '').trim());
  if (new Set(times).size === times.length) return null;
  // several rows at one time that differ in a text column: that column names them (rows merely
  // pasted twice repeat their text too, and stay an ordinary file)
  let best = -1,
    bestDistinct = 1;
  for (const c of candidates) {
    const atTime = new Map<string, Set<string>>();
    layout.sample.forEach((r, i) => {
      const set = atTime.get(times[i]) ?? new Set<string>();
      set.add((r.fields[c] ?? '').trim());
      atTime.set(times[i], set);
    });
    const d = Math.max(...[...atTime.values()].map((x) => x.size));
    if (d > bestDistinct) (best = c), (bestDistinct = d);
  }
  return best >= 0 ? { tagCol: best, unitCol } : null;
}

/** Every tag in the file with its unit and row count, in order of first appearance. */
export function listTags(rs: RowSource, cols: TagColumns): TagSummary[] {
  const byTag = new Map<string, TagSummary>();
  forEachRow(rs, (r) => {
    if (cols.tagCol >= r.count) return;
    const tag = r.src[cols.tagCol].slice(r.start[cols.tagCol], r.end[cols.tagCol]).trim();
    if (!tag) return;
    let s = byTag.get(tag);
    if (!s) byTag.set(tag, (s = { tag, unit: null, rows: 0 }));
    s.rows++;
    if (s.unit === null && cols.unitCol >= 0 && cols.unitCol < r.count) {
      const u = r.src[cols.unitCol].slice(r.start[cols.unitCol], r.end[cols.unitCol]).trim();
      if (u) s.unit = u;
    }
  });
  return [...byTag.values()];
}

export function tagList(tags: TagSummary[]): string {
  const shown = tags
    .slice(0, 12)
    .map((t) => `"${t.tag}"${t.unit ? ` [${t.unit}]` : ''} (${t.rows} rows)`);
  return shown.join(', ') + (tags.length > 12 ? `, … (${tags.length} tags)` : '');
}

/**
 * The tag to read: the one named (matched without regard to case), or the only one. Refuses,
 * listing the tags, when none is named and there are several, or the named one is absent.
 */
export function pickTag(
  tags: TagSummary[],
  wanted: string | undefined,
  fileName: string,
  what: 'level' | 'barometric',
  tagHeader: string,
): TagSummary {
  const option = what === 'level' ? '--level-tag' : '--baro-tag';
  if (tags.length === 0)
    throw new InputError(`the tag column "${tagHeader}" is empty`, {
      file: fileName,
      field: tagHeader,
    });
  if (wanted === undefined) {
    if (tags.length === 1) return tags[0];
    throw new InputError(
      `the file holds ${tags.length} tags in one column ("${tagHeader}"), one row per time and tag: ${tagList(tags)}; ` +
        `name the ${what} tag with ${option} TAG (efflux inspect lists them)`,
      { file: fileName, field: tagHeader },
    );
  }
  const want = wanted.trim().toLowerCase();
  const hit = tags.find((t) => t.tag.toLowerCase() === want);
  if (!hit)
    throw new InputError(`no tag "${wanted}" in column "${tagHeader}" (tags: ${tagList(tags)})`, {
      file: fileName,
      field: what === 'level' ? 'levelTag' : 'baroTag',
    });
  return hit;
}
