import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { canonicalJson } from '../../../server/core/report/canonical.js';
import { canonicalJson as storeCanonicalJson } from '../../../server/store/canonical-json.js';

/**
 * The audit chain and the stored fits' result hashes were written with the store's own canonical
 * JSON (server/store/canonical-json.ts as of f16b620, copied here verbatim as `storeRules`), and
 * the report ids with core's. The store now takes core's function, so the two must give the same
 * text for everything the store hashes, or old chains would stop verifying. The one difference in
 * the rules was function-valued members (core drops them, the store wrote null); nothing the store
 * hashes holds a function (rows and parsed JSON, results passed through structured clone).
 */
function storeRules(value: unknown): string {
  if (value === null || typeof value !== 'object') {
    if (typeof value === 'number' && !Number.isFinite(value)) return 'null';
    const s = JSON.stringify(value);
    return s === undefined ? 'null' : s;
  }
  if (Array.isArray(value)) return `[${value.map(storeRules).join(',')}]`;
  const obj = value as Record<string, unknown>;
  const keys = Object.keys(obj)
    .filter((k) => obj[k] !== undefined)
    .sort();
  return `{${keys.map((k) => `${JSON.stringify(k)}:${storeRules(obj[k])}`).join(',')}}`;
}

const numbers = [
  0,
  -0,
  1,
  -1,
  0.1,
  1 / 3,
  2 ** 53,
  2 ** 53 + 2,
  -(2 ** 31),
  1e21,
  1e-7,
  5e-324,
  Number.MAX_VALUE,
  NaN,
  Infinity,
  -Infinity,
  0.61234567891234,
  9.80665,
];
const strings = [
  '',
  'a"b\\c',
  'line\nfeed\ttab\u0000nul',
  '\u2028\u2029',
  'é',
  'e\u0301',
  '水位',
  '😀',
  '\ud800',
  '\udfff',
  'z',
  'Z',
  '~',
];

describe("core's canonical JSON against the rules the store's hashes were written with", () => {
  it('numbers, unicode strings and keys, nested arrays, undefined members', () => {
    const cases: unknown[] = [
      ...numbers,
      ...strings,
      null,
      true,
      false,
      undefined,
      numbers,
      [strings, [numbers, [[], [{}]]]],
      Object.fromEntries(strings.map((s, i) => [s, numbers[i]])),
      { b: 1, a: { d: [1, { z: 1, y: 2 }], c: undefined }, list: [undefined, null, NaN] },
      {
        fit: {
          effectiveAreaM2: { value: 7.6e-4, ci95: [7.5e-4, 7.7e-4] },
          warnings: [],
          note: undefined,
        },
      },
      { before: null, after: { role: 'reviewer', at: '2026-03-10T08:15:00.000Z' } },
    ];
    for (const c of cases) {
      expect(canonicalJson(c)).toBe(storeRules(c));
      expect(storeCanonicalJson(c)).toBe(storeRules(c));
    }
  });

  it('the one known difference: a function-valued member (dropped by core, null in the old rules)', () => {
    const v = { a: 1, f: () => 1 };
    expect(canonicalJson(v)).toBe('{"a":1}');
    expect(storeRules(v)).toBe('{"a":1,"f":null}');
  });

  it('any JSON-like value (fast-check, 300 cases, fixed seed)', () => {
    const leaf = fc.oneof(
      fc.double(),
      fc.integer(),
      fc.string({ unit: 'binary' }),
      fc.boolean(),
      fc.constant(null),
      fc.constant(undefined),
    );
    const value = fc.letrec((tie) => ({
      node: fc.oneof(
        { depthSize: 'small' },
        leaf,
        fc.array(tie('node')),
        fc.dictionary(fc.string({ unit: 'binary' }), tie('node')),
      ),
    })).node;
    fc.assert(
      fc.property(
        value,
        (v) => canonicalJson(v) === storeRules(v) && storeCanonicalJson(v) === storeRules(v),
      ),
      { numRuns: 300, seed: 20260310 },
    );
  });
});
