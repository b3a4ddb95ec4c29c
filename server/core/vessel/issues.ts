import type { z } from 'zod';

type Issue = z.core.$ZodIssue;
type Path = ReadonlyArray<PropertyKey>;

/** "shape.points.1.0" — the dotted path InputError.field carries. */
export function dotted(path: Path): string {
  return path.map(String).join('.');
}

function at(value: unknown, path: Path): unknown {
  let v = value;
  for (const k of path) {
    if (v === null || typeof v !== 'object') return undefined;
    v = (v as Record<PropertyKey, unknown>)[k];
  }
  return v;
}

function show(v: unknown): string {
  if (v === undefined) return 'nothing';
  if (typeof v === 'string') return JSON.stringify(v);
  if (Array.isArray(v)) return 'a list';
  if (v !== null && typeof v === 'object') return 'an object';
  return String(v);
}

const TYPE_WORDS: Record<string, string> = {
  number: 'a number',
  string: 'text',
  object: 'an object',
  array: 'a list',
  tuple: 'a list',
  boolean: 'true or false',
};

/** One person-readable sentence for a zod issue, and the field it is about. */
export function describeIssue(
  issue: Issue,
  input: unknown,
  prefix: Path = [],
): { field: string; message: string } {
  const path = [...prefix, ...issue.path];
  const got = at(input, path);
  const field = dotted(path);
  switch (issue.code) {
    case 'invalid_type':
      if (got === undefined) return { field, message: 'is required' };
      return {
        field,
        message: `must be ${TYPE_WORDS[issue.expected] ?? issue.expected} (got ${show(got)})`,
      };
    case 'too_small': {
      if (issue.origin === 'array')
        return { field, message: `needs at least ${issue.minimum} entries` };
      if (issue.origin === 'string') return { field, message: 'must not be empty' };
      if (Number(issue.minimum) === 0 && !issue.inclusive) {
        return { field, message: `must be a positive number (got ${show(got)})` };
      }
      return {
        field,
        message: `must be ${issue.inclusive ? '≥' : '>'} ${issue.minimum} (got ${show(got)})`,
      };
    }
    case 'too_big':
      if (issue.origin === 'array')
        return { field, message: `allows at most ${issue.maximum} entries` };
      if (issue.origin === 'string')
        return { field, message: `is longer than ${issue.maximum} characters` };
      return {
        field,
        message: `must be ${issue.inclusive ? '≤' : '<'} ${issue.maximum} (got ${show(got)})`,
      };
    case 'unrecognized_keys': {
      const key = issue.keys[0];
      const others = issue.keys.length > 1 ? ` (and ${issue.keys.length - 1} more)` : '';
      return { field: dotted([...path, key]), message: `is not a known field${others}` };
    }
    case 'invalid_value':
      return {
        field,
        message: `must be one of ${issue.values.map((v) => JSON.stringify(v)).join(', ')} (got ${show(got)})`,
      };
    case 'invalid_union': {
      const disc = (issue as { discriminator?: string; options?: unknown[] }).discriminator;
      if (disc !== undefined) {
        const options = ((issue as { options?: unknown[] }).options ?? []).map((o) =>
          JSON.stringify(o),
        );
        return { field, message: `must be one of ${options.join(', ')} (got ${show(got)})` };
      }
      // Several forms are allowed: report the one the input evidently meant, i.e. the only
      // branch whose fields the input does not overstep.
      const fitting = issue.errors.filter(
        (branch) => !branch.some((i) => i.code === 'unrecognized_keys'),
      );
      if (fitting.length === 1 && fitting[0].length > 0)
        return describeIssue(fitting[0][0], input, path);
      return { field, message: unionHint(field) };
    }
    default:
      return { field, message: issue.message };
  }
}

function unionHint(field: string): string {
  if (field === 'fluid') return 'must give exactly one of densityKgM3 or temperatureC';
  return 'is not in any accepted form';
}
