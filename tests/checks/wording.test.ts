import { describe, expect, it } from 'vitest';
import { describeShotSide, formatQuantity } from '../../lib/checks/wording.js';

describe('wording of check messages', () => {
  it('describeShotSide names the shot and the side', () => {
    expect(describeShotSide({ shot: 'S3', side: 'reverse' })).toBe('shot S3, reverse side');
  });

  it('formatQuantity gives significant digits without trailing zeros and never an exponent for large values', () => {
    // Number and unit are joined by a no-break space (U+00A0).
    expect(formatQuantity(8.0085049, 'm')).toBe('8.009\u00a0m');
    expect(formatQuantity(9999.6, 'm')).toBe('10000\u00a0m');
    expect(formatQuantity(-3000.4, 'm')).toBe('-3000\u00a0m');
    expect(formatQuantity(0.0193649, 's')).toBe('0.01936\u00a0s');
    expect(formatQuantity(800, 'm/s')).toBe('800\u00a0m/s');
    expect(formatQuantity(10, 'm')).toBe('10\u00a0m');
    expect(formatQuantity(12345.6, 'm/s')).toBe('12346\u00a0m/s');
  });
});

describe('formatQuantity at crustal scale', () => {
  it('formatQuantity writes lengths of 10 km or more in km', () => {
    expect(formatQuantity(31375.13, 'm')).toBe('31.38\u00a0km');
    expect(formatQuantity(16839.7, 'm', 3)).toBe('16.8\u00a0km');
    expect(formatQuantity(-10000, 'm')).toBe('-10\u00a0km');
  });
});
