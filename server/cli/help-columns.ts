/**
 * `--help` lists as two aligned columns: names padded to the longest name plus two spaces (so a
 * long name never runs into its summary), summaries wrapped at `width` under their own column.
 */
export function helpColumns(
  rows: readonly (readonly [string, string])[],
  width = 100,
  indent = '  ',
): string[] {
  const nameWidth = Math.max(...rows.map(([n]) => n.length)) + 2;
  const room = Math.max(30, width - indent.length - nameWidth);
  const out: string[] = [];
  for (const [name, summary] of rows) {
    const words = summary.split(' ');
    let line = '';
    const wrapped: string[] = [];
    for (const w of words) {
      if (line && line.length + 1 + w.length > room) {
        wrapped.push(line);
        line = w;
      } else line = line ? `${line} ${w}` : w;
    }
    wrapped.push(line);
    out.push(`${indent}${name.padEnd(nameWidth)}${wrapped[0]}`);
    for (const more of wrapped.slice(1)) out.push(`${indent}${' '.repeat(nameWidth)}${more}`);
  }
  return out;
}
