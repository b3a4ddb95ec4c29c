/**
 * Where a JSON text first goes wrong, as a 0-based offset, or -1 when it is valid.
 * JSON.parse reports a position for some errors only (and its wording changes between Node
 * versions), so the vessel-file reader finds the place itself to give a line number.
 */
export function jsonErrorOffset(text: string): number {
  let i = 0;
  const n = text.length;
  const ws = () => {
    while (i < n && (text[i] === ' ' || text[i] === '\t' || text[i] === '\n' || text[i] === '\r'))
      i++;
  };
  // Each reader returns false at the first error, leaving i there.
  const value = (): boolean => {
    ws();
    const c = text[i];
    if (c === '{') return object();
    if (c === '[') return array();
    if (c === '"') return string();
    if (c === '-' || (c >= '0' && c <= '9')) return number();
    for (const word of ['true', 'false', 'null']) {
      if (text.startsWith(word, i)) {
        i += word.length;
        return true;
      }
    }
    return false;
  };
  const string = (): boolean => {
    i++; // opening quote
    while (i < n) {
      const c = text.charCodeAt(i);
      if (c === 0x22) {
        i++;
        return true;
      }
      if (c < 0x20) return false;
      if (c === 0x5c) {
        const e = text[i + 1];
        if (e === 'u') {
          if (!/^[0-9a-fA-F]{4}$/.test(text.slice(i + 2, i + 6))) return false;
          i += 6;
        } else if (e !== undefined && '"\\/bfnrt'.includes(e)) i += 2;
        else return false;
      } else i++;
    }
    return false;
  };
  const number = (): boolean => {
    const m = /^-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/.exec(text.slice(i, i + 400));
    if (!m) return false;
    i += m[0].length;
    return true;
  };
  const array = (): boolean => {
    i++;
    ws();
    if (text[i] === ']') {
      i++;
      return true;
    }
    for (;;) {
      if (!value()) return false;
      ws();
      if (text[i] === ',') i++;
      else if (text[i] === ']') {
        i++;
        return true;
      } else return false;
    }
  };
  const object = (): boolean => {
    i++;
    ws();
    if (text[i] === '}') {
      i++;
      return true;
    }
    for (;;) {
      ws();
      if (text[i] !== '"' || !string()) return false;
      ws();
      if (text[i] !== ':') return false;
      i++;
      if (!value()) return false;
      ws();
      if (text[i] === ',') i++;
      else if (text[i] === '}') {
        i++;
        return true;
      } else return false;
    }
  };
  if (!value()) return Math.min(i, n);
  ws();
  return i < n ? i : -1;
}

/** 1-based line of a 0-based offset. */
export function lineOf(text: string, offset: number): number {
  let line = 1;
  for (let k = 0; k < offset && k < text.length; k++) if (text.charCodeAt(k) === 10) line++;
  return line;
}
