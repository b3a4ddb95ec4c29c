import { describe, expect, it } from 'vitest';
import { InputError } from '../../server/core/errors.js';

describe('InputError', () => {
  it('names file, line and field in one line', () => {
    const e = new InputError('not a number', { file: 'log.csv', line: 12, field: 'level' });
    expect(e.toLine()).toBe('log.csv, line 12, field level: not a number');
  });
  it('is just the message when nothing is located', () => {
    expect(new InputError('empty file').toLine()).toBe('empty file');
  });
});
