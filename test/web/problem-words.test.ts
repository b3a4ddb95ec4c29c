/** The connected-vessels page says a refused field as its own labels do, never the API's names. */
import { describe, expect, it } from 'vitest';
import { ApiError } from '../../web/src/api.js';
import { fieldWords, plainProblem } from '../../web/src/problem-words.js';

const vessels = [
  { id: 'WT4', name: 'Wash tank WT-4' },
  { id: 'HT5', name: 'Holding tank HT-5' },
];

describe('fieldWords', () => {
  it.each([
    ['log:WT4', 'Level log of Wash tank WT-4 (WT4)'],
    ['inflow:WT4', 'Inflow log into Wash tank WT-4 (WT4)'],
    ['system', 'System file'],
    ['window', 'Span to fit'],
    ['vessels.1.outlet.boreM', 'System file, vessel Holding tank HT-5 (HT5): outlet, bore'],
    ['inflows.0.constant', 'System file, inflow 1'],
  ])('%s → %s', (field, words) => expect(fieldWords(field, vessels)).toBe(words));
  it('leaves a column name alone (no page label for it)', () =>
    expect(fieldWords('level', vessels)).toBeNull());
});

describe('plainProblem', () => {
  it('names the field as the page does and rewrites the API field inside the sentence', () => {
    // the service's answer when the pump's flow log is missing (server/jobs/system-fit.ts)
    const e = new ApiError(422, 'x', {
      detail:
        'field inflow:WT4: the system file gives a logged inflow for "WT4" (pump.csv): send it as the file field "inflow:WT4"',
      field: 'inflow:WT4',
      errors: [
        {
          path: 'inflow:WT4',
          message:
            'the system file gives a logged inflow for "WT4" (pump.csv): send it as the file field "inflow:WT4"',
        },
      ],
    });
    const said = plainProblem(e, vessels);
    expect(said).toBe(
      'Inflow log into Wash tank WT-4 (WT4): the system file gives a logged inflow for "WT4" (pump.csv): send it as the field “Inflow log into Wash tank WT-4 (WT4)”',
    );
    expect(said).not.toMatch(/inflow:WT4/);
  });
  it('keeps the file and line of a refusal inside a log', () => {
    const e = new ApiError(422, 'x', {
      file: 'ht5.csv',
      line: 6,
      field: 'inflow:WT4',
      errors: [{ path: 'inflow:WT4', message: 'no flow column' }],
    });
    expect(plainProblem(e, vessels)).toBe(
      'Inflow log into Wash tank WT-4 (WT4), ht5.csv, line 6: no flow column',
    );
  });
});
