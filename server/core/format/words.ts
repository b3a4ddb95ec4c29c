/** Counting words: "1 warning", "0 warnings", "2 outlets" (never "warning(s)"). */
export function countText(n: number, one: string, many = `${one}s`): string {
  return `${n} ${n === 1 ? one : many}`;
}

/** A name cut to `width` characters with an ellipsis, so a cut never passes for a whole name. */
export function clipText(text: string, width: number): string {
  const chars = [...text];
  if (chars.length <= width) return text;
  return width <= 1 ? '…' : `${chars.slice(0, width - 1).join('')}…`;
}
