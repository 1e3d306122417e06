import { create, all, type MathJsInstance } from 'mathjs';
import { EV_J, PC_M, YEAR_S } from '../kernel/constants';

let math: MathJsInstance | undefined;

/**
 * mathjs with the astronomer's units it lacks: parsec (IAU 2015 Resolution B2: 648000/π au) and the
 * Julian year (IAU: 365.25 d), both with SI prefixes so kpc, Mpc, Gpc, Myr and Gyr all work; and the
 * electronvolt at its exact SI value (CODATA 2018), which mathjs carries at an older one.
 */
function units(): MathJsInstance {
  if (!math) {
    math = create(all);
    math.createUnit('pc', { definition: `${PC_M} m`, prefixes: 'short', aliases: ['parsec', 'parsecs'] });
    math.createUnit('yr', { definition: `${YEAR_S} s`, prefixes: 'short' });
    math.createUnit('eV', { definition: `${EV_J} J`, prefixes: 'short', aliases: ['electronvolt', 'electronvolts'] }, { override: true });
  }
  return math;
}

/** mathjs reads 'Gyr^-1' but not the way people write it, '1/Gyr'. */
function reciprocal(u: string): string {
  const m = /^\s*1\s*\/\s*([A-Za-z]+)\s*$/.exec(u);
  return m ? `${m[1]}^-1` : u;
}

/** value in unit `from` expressed in unit `to`; throws a message naming what is wrong. */
export function convertUnits(value: number, fromUnit: string, toUnit: string): number {
  const m = units();
  const from = reciprocal(fromUnit);
  const to = reciprocal(toUnit);
  let u;
  try {
    u = m.unit(value, from);
  } catch {
    throw new Error(`convert: unknown unit "${fromUnit}" (from)`);
  }
  try {
    m.unit(1, to);
  } catch {
    throw new Error(`convert: unknown unit "${toUnit}" (to)`);
  }
  try {
    return u.toNumber(to);
  } catch {
    throw new Error(`convert: cannot convert ${fromUnit} to ${toUnit}: the units measure different things`);
  }
}
