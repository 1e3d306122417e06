import { describe, expect, it } from 'vitest';
import { inputsFromQuery, inputsToQuery } from '../../src/components/recipes/inputsQuery';

// Common practice: a link carries numbers as decimal text; ECMAScript's Number-to-String gives the
// shortest text that reads back as the same double (ECMA-262, Number::toString), so the trip is exact.
describe('recipe inputs in a link', () => {
  it('round-trips doubles exactly', () => {
    const inputs = { omegaM: 0.3307692307692308, w0: -1.1205128205128205, H0: 67.66, tiny: 1e-300 };
    expect(inputsFromQuery(inputsToQuery(inputs))).toEqual(inputs);
    expect(inputsToQuery({ w0: -1.5 })).toEqual({ 'in.w0': '-1.5' });
  });

  it('ignores other query keys and anything that is not a finite number', () => {
    expect(inputsFromQuery({ 'in.a': '2', 'in.b': 'abc', 'in.c': '', 'in.d': 'Infinity', other: '3', 'in.e': ['1', '2'] })).toEqual({ a: 2 });
    expect(inputsToQuery({ a: Number.NaN, b: 1 })).toEqual({ 'in.b': '1' });
  });
});
