import { describe, expect, it } from 'vitest';
import {
  matchSites,
  resolveOutletName,
  resolveVesselName,
  type OutletName,
} from '../../../server/core/vessel/names.js';

const o = (p: Partial<OutletName> & Pick<OutletName, 'outletId' | 'key'>): OutletName => ({
  vesselId: 1,
  vesselName: 'Filter drain tank FD-2',
  vesselTag: 'FD-2',
  site: 'Kestrel Fen works (fictional)',
  retired: false,
  ...p,
});

const FLEET: OutletName[] = [
  o({ outletId: 11, key: 'drain' }),
  o({
    outletId: 12,
    key: 'drain',
    vesselId: 2,
    vesselName: 'Filter drain tank FD-3',
    vesselTag: 'FD-3',
  }),
  o({ outletId: 13, key: 'V-7', vesselId: 3, vesselName: 'Rinse tank', vesselTag: null }),
  o({ outletId: 14, key: 'low', vesselId: 4, vesselName: 'Two-outlet tank', vesselTag: 'TT-1' }),
  o({ outletId: 15, key: 'high', vesselId: 4, vesselName: 'Two-outlet tank', vesselTag: 'TT-1' }),
  o({
    outletId: 16,
    key: 'old',
    vesselId: 5,
    vesselName: 'Sump',
    vesselTag: 'SU-1',
    retired: true,
  }),
  o({ outletId: 17, key: 'new', vesselId: 5, vesselName: 'Sump', vesselTag: 'SU-1' }),
];

describe('outlet names', () => {
  it('reads an id, an outlet tag, a one-outlet vessel tag or VESSEL/OUTLET, in any case', () => {
    expect(resolveOutletName('12', FLEET).outletId).toBe(12);
    expect(resolveOutletName('fd-2', FLEET).outletId).toBe(11);
    expect(resolveOutletName('v-7', FLEET).outletId).toBe(13);
    expect(resolveOutletName('TT-1/high', FLEET).outletId).toBe(15);
    expect(resolveOutletName('Rinse tank/V-7', FLEET).outletId).toBe(13);
    // a retired outlet is passed over while one is in service
    expect(resolveOutletName('SU-1', FLEET).outletId).toBe(17);
    expect(resolveOutletName('SU-1/old', FLEET).outletId).toBe(16);
  });

  it('refuses a name that fits several outlets, listing each, and one that fits none', () => {
    expect(() => resolveOutletName('drain', FLEET)).toThrow(
      /"drain" names 2 outlets[\s\S]*FD-2\/drain \(outlet 11[\s\S]*FD-3\/drain \(outlet 12/,
    );
    expect(() => resolveOutletName('TT-1', FLEET)).toThrow(/names 2 outlets/);
    expect(() => resolveOutletName('99', FLEET)).toThrow('outlet 99 not found');
    expect(() => resolveOutletName('XX-9', FLEET)).toThrow('no outlet tagged "XX-9"');
  });

  it('names vessels by id, tag or name', () => {
    expect(resolveVesselName('fd-3', FLEET).vesselId).toBe(2);
    expect(resolveVesselName('two-outlet TANK', FLEET).vesselId).toBe(4);
    expect(resolveVesselName('5', FLEET).vesselName).toBe('Sump');
    expect(() => resolveVesselName('nope', FLEET)).toThrow('no vessel "nope"');
  });
});

describe('site filters', () => {
  const SITES = ['Kestrel Fen works (fictional)', 'North yard (fictional)', 'Fen'];
  it('match part of a name in any case; an exact name alone wins', () => {
    expect(matchSites('YARD', SITES)).toEqual(['North yard (fictional)']);
    expect(matchSites('fictional', SITES)).toEqual(SITES.slice(0, 2));
    expect(matchSites('fen', SITES)).toEqual(['Fen']);
    expect(() => matchSites('south', SITES)).toThrow(
      /no site name contains "south"; the sites are: /,
    );
  });
});
