/** Where two JSON values differ, by path: what `report verify` prints when a report does not match. */
export interface ReportDifference {
  path: string;
  inFile: unknown;
  inRecords: unknown;
}

const short = (v: unknown) => {
  if (v === undefined) return undefined;
  const s = JSON.stringify(v);
  return s.length > 80 ? `${s.slice(0, 77)}...` : JSON.parse(s);
};

/** Differences between `a` (the file) and `b` (rebuilt from the records), at most `limit` of them. */
export function compareReports(
  a: unknown,
  b: unknown,
  limit = 20,
  ignore: readonly string[] = [],
): ReportDifference[] {
  const out: ReportDifference[] = [];
  const walk = (x: unknown, y: unknown, path: string) => {
    if (out.length >= limit || ignore.includes(path)) return;
    const isObj = (v: unknown) => v !== null && typeof v === 'object';
    if (isObj(x) && isObj(y) && Array.isArray(x) === Array.isArray(y)) {
      if (Array.isArray(x) && Array.isArray(y) && x.length !== y.length) {
        out.push({ path: `${path}.length`, inFile: x.length, inRecords: y.length });
      }
      const keys = new Set([...Object.keys(x as object), ...Object.keys(y as object)]);
      for (const k of [...keys].sort())
        walk((x as any)[k], (y as any)[k], path ? `${path}.${k}` : k);
      return;
    }
    if (JSON.stringify(x) !== JSON.stringify(y))
      out.push({ path: path || '(whole)', inFile: short(x), inRecords: short(y) });
  };
  walk(a, b, '');
  return out;
}
