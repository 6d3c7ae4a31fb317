import { describe, expect, it } from 'vitest';
import { definedOnly } from '../../lib/defined-only.js';

describe('definedOnly', () => {
  it('drops undefined keys so defaults survive a spread, keeps null, 0 and false, and leaves the input alone', () => {
    const options = { seed: undefined, scale: null, replicates: 0, robust: false };
    expect({ seed: 1, ...definedOnly(options) }).toEqual({ seed: 1, scale: null, replicates: 0, robust: false });
    expect(options).toEqual({ seed: undefined, scale: null, replicates: 0, robust: false });
  });
});
