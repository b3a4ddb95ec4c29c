import { describe, expect, it } from 'vitest';
import {
  canonicalJson,
  compareReports,
  contentHash,
  withIdentity,
} from '../../../server/core/report/index.js';
import { sha256Hex } from '../../../server/sha256.js';

describe('sha256Hex (node:crypto, injected into the report model)', () => {
  it('gives the FIPS 180-2 example digests', () => {
    // FIPS 180-2, Appendix B.1 and B.2 (one-block and two-block messages)
    expect(sha256Hex('abc')).toBe(
      'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad',
    );
    expect(sha256Hex('abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq')).toBe(
      '248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1',
    );
  });

  it('hashes text as its UTF-8 bytes', () => {
    expect(sha256Hex('Kestrel Fen · σ')).toBe(
      sha256Hex(new TextEncoder().encode('Kestrel Fen · σ')),
    );
  });
});

describe('canonical JSON and the report identity', () => {
  it('sorts keys, drops undefined and writes non-finite numbers as null', () => {
    expect(
      canonicalJson({ b: 1, a: [NaN, Infinity, 'x'], c: undefined, d: { z: null, y: 2 } }),
    ).toBe('{"a":[null,null,"x"],"b":1,"d":{"y":2,"z":null}}');
  });

  it('derives the id from the content hash, independent of key order', () => {
    const a = withIdentity({ x: 1, y: { p: 2, q: [1, 2] } }, sha256Hex);
    const b = withIdentity({ y: { q: [1, 2], p: 2 }, x: 1 }, sha256Hex);
    expect(a.contentSha256).toBe(b.contentSha256);
    expect(a.reportId).toBe(a.contentSha256.slice(0, 16));
    expect(contentHash(a, sha256Hex)).toBe(a.contentSha256); // the identity fields are left out of the hash
    expect(withIdentity({ x: 2, y: { p: 2, q: [1, 2] } }, sha256Hex).contentSha256).not.toBe(
      a.contentSha256,
    );
  });

  it('names the paths where two reports differ', () => {
    const d = compareReports(
      { a: { b: 1, c: [1, 2] }, k: 'same' },
      { a: { b: 2, c: [1, 2, 3] }, k: 'same' },
    );
    expect(d.map((x) => x.path)).toEqual(['a.b', 'a.c.length', 'a.c.2']);
    expect(d[0]).toEqual({ path: 'a.b', inFile: 1, inRecords: 2 });
  });
});
