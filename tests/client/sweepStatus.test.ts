import { describe, expect, it } from 'vitest';
import { duration } from '../../src/components/sweeps/status';

// Display rules of our own (common practice: tenths of a second under ten seconds, then whole units).
describe('sweep durations as shown', () => {
  it('keeps tenths under ten seconds and whole seconds, minutes and hours above', () => {
    expect(duration(1634)).toBe('1.6 s');
    expect(duration(0)).toBe('0.0 s');
    expect(duration(9_940)).toBe('9.9 s');
    expect(duration(9_960)).toBe('10 s');
    expect(duration(65_000)).toBe('1 min 5 s');
    expect(duration(3_725_000)).toBe('1 h 2 min');
    expect(duration(null)).toBe('—');
    expect(duration(Number.NaN)).toBe('—');
  });
});
