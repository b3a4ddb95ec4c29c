/**
 * The decimal mark and the thousands separator, from the cells of the first data rows.
 * Certain: a cell with both marks ("2,099.9": the last one is the decimal mark), one mark twice
 * ("1,234,567": a separator), or a mark not followed by exactly three digits ("12,5": decimal).
 * Cells like "1,234" alone could be either: refused unless --decimal says which, except in a
 * file not split on commas with no other evidence, where the decimal comma stays (as before).
 */
import { InputError } from '../errors.js';
import type { ReadNote } from './series.js';

/** A number grouped in threes, in any convention (the file decides which). */
export const GROUPED = /^\s*[+-]?\d{1,3}([,. \u00a0\u202f']\d{3})+([.,]\d+)?\s*$/;

interface Evidence {
  commaGroup: string;
  dotGroup: string;
  spaceGroup: string;
  commaDecimal: string;
  dotDecimal: string;
  ambiguousComma: string;
  ambiguousDot: string;
}

function gather(cells: Iterable<string>): Evidence {
  const e: Evidence = {
    commaGroup: '',
    dotGroup: '',
    spaceGroup: '',
    commaDecimal: '',
    dotDecimal: '',
    ambiguousComma: '',
    ambiguousDot: '',
  };
  for (const raw of cells) {
    const f = raw.trim();
    if (!/\d/.test(f) || !/^[+-]?[\d.,\u00a0\u202f' ]+([eE][+-]?\d+)?$/.test(f)) continue;
    if (/^[+-]?\d{1,3}(,\d{3})+\.\d*$/.test(f) || /^[+-]?\d{1,3}(,\d{3}){2,}$/.test(f))
      e.commaGroup ||= f;
    else if (/^[+-]?\d{1,3}(\.\d{3})+,\d*$/.test(f) || /^[+-]?\d{1,3}(\.\d{3}){2,}$/.test(f))
      e.dotGroup ||= f;
    else if (/^[+-]?\d{1,3}([ \u00a0\u202f']\d{3})+([.,]\d+)?$/.test(f)) e.spaceGroup ||= f;
    else if (/^[+-]?[1-9]\d{0,2},\d{3}$/.test(f)) e.ambiguousComma ||= f;
    else if (/^[+-]?[1-9]\d{0,2}\.\d{3}$/.test(f)) e.ambiguousDot ||= f;
    else if (/^[+-]?\d*,\d+([eE][+-]?\d+)?$/.test(f)) e.commaDecimal ||= f;
    else if (/^[+-]?\d*\.\d+([eE][+-]?\d+)?$/.test(f)) e.dotDecimal ||= f;
  }
  return e;
}

export function numberFormat(
  cells: Iterable<string>,
  delimiter: string,
  given: '.' | ',' | undefined,
  fileName: string,
  notes: ReadNote[],
): { decimal: '.' | ','; group: string } {
  const e = gather(cells);
  const say = (message: string) => notes.push({ code: 'decimal', message });
  const spaceChar = e.spaceGroup ? e.spaceGroup.replace(/[\d.,+-]/g, '')[0] : '';
  if (given) {
    say(`decimal mark "${given}", as given`);
    const group =
      given === '.'
        ? e.commaGroup || e.ambiguousComma
          ? ','
          : spaceChar
        : e.dotGroup || e.ambiguousDot
          ? '.'
          : spaceChar;
    if (group)
      say(`thousands grouped with ${group === ',' || group === '.' ? `"${group}"` : 'a space'}`);
    return { decimal: given, group };
  }
  const refuse = (why: string): never => {
    throw new InputError(
      `${why}; give --decimal . (a point marks decimals) or --decimal , (a comma marks decimals)`,
      { file: fileName, field: 'decimal' },
    );
  };
  if (e.commaGroup && e.dotGroup)
    refuse(
      `numbers such as "${e.commaGroup}" and "${e.dotGroup}" group thousands in both conventions`,
    );
  if (e.commaGroup || (e.ambiguousComma && e.dotDecimal && !e.commaDecimal)) {
    if (e.commaDecimal)
      refuse(
        `"${e.commaGroup}" groups thousands with a comma but "${e.commaDecimal}" has a decimal comma`,
      );
    say(
      `decimal point, thousands grouped with a comma: numbers such as "${e.commaGroup || e.ambiguousComma}"`,
    );
    return { decimal: '.', group: ',' };
  }
  if (e.dotGroup || (e.ambiguousDot && e.commaDecimal && !e.dotDecimal)) {
    if (e.dotDecimal)
      refuse(
        `"${e.dotGroup}" groups thousands with a point but "${e.dotDecimal}" has a decimal point`,
      );
    say(
      `decimal comma, thousands grouped with a point: numbers such as "${e.dotGroup || e.ambiguousDot}"`,
    );
    return { decimal: ',', group: '.' };
  }
  if (e.ambiguousComma && !e.commaDecimal && !e.dotDecimal && delimiter === ',')
    refuse(
      `numbers such as "${e.ambiguousComma}" could have a decimal comma or a comma grouping thousands, and no other number tells which`,
    );
  const commaDecimal = !!(e.commaDecimal || e.ambiguousComma) && !e.dotDecimal;
  if (commaDecimal)
    say(
      `decimal comma: numbers such as "${e.ambiguousComma || e.commaDecimal}" and none with a decimal point`,
    );
  if (spaceChar) say(`thousands grouped with a space: numbers such as "${e.spaceGroup}"`);
  return { decimal: commaDecimal ? ',' : '.', group: spaceChar };
}
