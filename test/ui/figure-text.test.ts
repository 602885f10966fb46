/** Figure text: plain-decimal ticks, stacked labels at line ends, and key markers. */
import { describe, expect, it } from 'vitest';
import { plainNumber } from '../../src/ui/format.ts';
import { endLabelNudges, sizeTick } from '../../src/ui/plots.ts';
import { symbolPath } from '../../src/ui/figure-key.ts';
import { ARM_SYMBOLS } from '../../src/ui/palette.ts';

describe('plainNumber', () => {
  it('writes ticks as plain decimals, never with SI suffixes or exponents', () => {
    expect([0.00001, 0.001, 0.01, 0.1, 0.3333333, 1, 1.5, 10, 1000].map(plainNumber)).toEqual(['0.00001', '0.001', '0.01', '0.1', '0.3333', '1', '1.5', '10', '1000']);
    expect(plainNumber(12345)).toBe('12,345');
    expect(plainNumber(-0.01)).toBe('−0.01');
    expect(plainNumber(0)).toBe('0');
  });
});

describe('endLabelNudges', () => {
  it('leaves labels far apart alone and stacks close ones one line apart around their middle', () => {
    expect(endLabelNudges([1, 5, 9], 10, 14)).toEqual([0, 0, 0]);
    // 5.0 and 5.1 are within 6% of a span of 10: the higher value goes up (negative y), the lower down.
    expect(endLabelNudges([5, 5.1, 9], 10, 14)).toEqual([7, -7, 0]);
    expect(endLabelNudges([2, 2, 2], 10, 12)).toEqual([-12, 0, 12]);
  });
});

describe('symbolPath', () => {
  it('draws a closed path for every arm marker shape', () => {
    for (const symbol of ARM_SYMBOLS) expect(symbolPath(symbol, 10, 10, 4)).toMatch(/^M.*Z$/);
  });
});

describe('sizeTick', () => {
  it('puts the depth under each size, and the file name over a graph file\'s rung', () => {
    const row = { scale: 1, meanDegree: 3, inTrainingRange: false };
    const tick = sizeTick({ ladder: [{ ...row, size: 24, depthMean: 4.25 }, { ...row, size: 49, depthMean: 7, file: 'us-states.csv' }] });
    expect(tick(24)).toBe('24\ndepth 4.3');
    expect(tick(49)).toBe('us-states.csv\n49\ndepth 7');
    expect(tick(12)).toBe('12');
  });
});
