/**
 * Refusals of the connected-vessels forms in the page's own words: the service names form fields
 * as the API does ("log:WT4", "inflow:WT4", "vessels.0.outlet"); the page says them as its labels
 * do ("Level log of Wash tank WT-4 (WT4)").
 */
import { ApiError } from './api.js';

/**
 * The service names form fields as the API does ("log:WT4", "inflow:WT4", "vessels.0.outlet");
 * the page says them as its own labels do.
 */
export function fieldWords(field: string, vessels: { id: string; name: string }[]): string | null {
  const named = (id: string) => {
    const v = vessels.find((x) => x.id === id);
    return v ? `${v.name} (${v.id})` : id;
  };
  let m = /^log:(.+)$/.exec(field);
  if (m) return `Level log of ${named(m[1])}`;
  m = /^inflow:(.+)$/.exec(field);
  if (m) return `Inflow log into ${named(m[1])}`;
  if (field === 'system') return 'System file';
  if (field === 'site') return 'Site';
  if (field === 'window') return 'Span to fit';
  m = /^vessels\.(\d+)(?:\.(.+))?$/.exec(field);
  if (m) {
    const v = vessels[Number(m[1])];
    const what = m[2]
      ? m[2]
          .split('.')
          .map((w) =>
            w
              .replace(/([a-z])([A-Z])/g, '$1 $2')
              .toLowerCase()
              .replace(/ m2?$/, ''),
          )
          .join(', ')
      : null;
    return `System file, vessel ${v ? named(v.id) : Number(m[1]) + 1}${what ? `: ${what}` : ''}`;
  }
  m = /^inflows\.(\d+)/.exec(field);
  if (m) return `System file, inflow ${Number(m[1]) + 1}`;
  return null;
}

/** A refusal in the page's own words: the field as the page names it, and no API field names. */
export function plainProblem(e: unknown, vessels: { id: string; name: string }[]): string {
  if (!(e instanceof ApiError)) return String(e);
  const p = e.problem ?? {};
  const first = Array.isArray(p.errors)
    ? (p.errors[0] as { path?: string; message?: string } | undefined)
    : undefined;
  const field = typeof p.field === 'string' ? p.field : (first?.path ?? null);
  const where = [
    typeof p.file === 'string' ? p.file : null,
    typeof p.line === 'number' ? `line ${p.line}` : null,
  ]
    .filter(Boolean)
    .join(', ');
  const message = String(first?.message ?? p.detail ?? e.message)
    // the service's sentence may name API fields ("send it as the file field "inflow:WT4"")
    .replace(
      /(?:the )?file field "((?:log|inflow):[^"]+)"/g,
      (_m, f: string) => `the field “${fieldWords(f, vessels)}”`,
    )
    .replace(
      /(?:send )?a file field "log:ID" for every vessel/g,
      'give a level log for every vessel',
    );
  const label = field ? fieldWords(field, vessels) : null;
  return [label, where].filter(Boolean).join(', ') + (label || where ? ': ' : '') + message;
}
