import { describe, expect, it } from 'vitest';
import { describeShotSide, formatQuantity } from '../../lib/checks/wording.js';

describe('wording of check messages', () => {
  it('describeShotSide names the shot and the side', () => {
    expect(describeShotSide({ shot: 'S3', side: 'reverse' })).toBe('shot S3, reverse side');
  });

  it('formatQuantity gives significant digits without trailing zeros and never an exponent for large values', () => {
    expect(formatQuantity(8.0085049, 'm')).toBe('8.009 m');
    expect(formatQuantity(31375.13, 'm')).toBe('31375 m');
    expect(formatQuantity(16839.7, 'm', 3)).toBe('16840 m');
    expect(formatQuantity(-3000.4, 'm')).toBe('-3000 m');
    expect(formatQuantity(0.0193649, 's')).toBe('0.01936 s');
    expect(formatQuantity(800, 'm/s')).toBe('800 m/s');
    expect(formatQuantity(10, 'm')).toBe('10 m');
  });
});
