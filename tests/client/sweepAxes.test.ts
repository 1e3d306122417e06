import { describe, expect, it } from 'vitest';
import { axisLength, axisValues, checkChoice, defaultChoice, parseList, toAxis } from '../../src/components/sweeps/axes';
import { axisValues as serverAxisValues } from '../../server/services/sweeps/grid';
import type { ParamDeclaration } from '../../shared/schemas/recipes';

const omegaM: ParamDeclaration = { name: 'omegaM', default: 0.3, min: 0.05, max: 0.95, line: 1, column: 1 };

describe('new-sweep form axes', () => {
  it('builds the same axis values as the server grid (the plot and the table must line up)', () => {
    const axes = [
      { from: 0.2, to: 0.4, steps: 8, scale: 'linear' as const },
      { from: 1e-3, to: 10, steps: 9, scale: 'log' as const },
      { from: 5, to: 5, steps: 1, scale: 'linear' as const },
      { values: [3, 1, 2] },
    ];
    for (const a of axes) expect(axisValues(a)).toEqual(Array.from(serverAxisValues('x', a)));
    // A log axis is geometric: each step multiplies by the same factor (10^(4/8) here; analytic).
    const log = axisValues(axes[1]!);
    for (let i = 1; i < log.length; i++) expect(log[i]! / log[i - 1]!).toBeCloseTo(10 ** 0.5, 10);
  });

  it('counts points and checks ranges before anything is sent', () => {
    const c = { ...defaultChoice(omegaM), vary: true, from: 0.2, to: 0.4, steps: 8 };
    expect(checkChoice(omegaM, c)).toEqual({});
    expect(axisLength(c)).toBe(8);
    expect(toAxis(c)).toEqual({ from: 0.2, to: 0.4, steps: 8, scale: 'linear' });
    expect(checkChoice(omegaM, { ...c, to: 1.2 }).to).toContain('at most 0.95');
    expect(checkChoice(omegaM, { ...c, scale: 'log', from: 0.2 })).toEqual({});
    expect(checkChoice(omegaM, { ...c, steps: 2.5 }).steps).toContain('whole number');
    const list = { ...c, mode: 'list' as const, list: '0.2, 0.3; 0.4 0.5' };
    expect(axisLength(list)).toBe(4);
    expect(parseList('0.2, x')).toBe('“x” is not a number.');
    expect(checkChoice(omegaM, { ...list, list: '0.2, 0.99' }).list).toContain('above the allowed range');
    expect(checkChoice(omegaM, { ...c, vary: false, fixed: 0.01 }).fixed).toContain('below the allowed range');
  });
});
