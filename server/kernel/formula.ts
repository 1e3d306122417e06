/**
 * User-supplied functions of the scale factor: formula strings (w(a), extra-fluid densities,
 * emissivities) compiled once with mathjs in a restricted grammar, and tabulated functions with
 * monotone cubic interpolation. Never `eval`: the parsed tree is checked node by node against a
 * whitelist before mathjs compiles it, so a formula cannot define, assign, import or index anything.
 */
import { parse, type MathNode } from 'mathjs';

export class FormulaError extends Error {
  constructor(public readonly formulaName: string, message: string) {
    super(`${formulaName}: ${message}`);
    this.name = 'FormulaError';
  }
}

/** Functions a formula may call (all real-valued on the reals or on a documented domain). */
const ALLOWED_FUNCTIONS = new Set([
  'sin', 'cos', 'tan', 'asin', 'acos', 'atan', 'atan2', 'sinh', 'cosh', 'tanh', 'asinh', 'acosh', 'atanh',
  'exp', 'expm1', 'log', 'log10', 'log2', 'log1p', 'sqrt', 'cbrt', 'pow', 'abs', 'sign', 'min', 'max',
  'floor', 'ceil', 'round', 'erf', 'gamma',
]);
const ALLOWED_CONSTANTS = new Set(['pi', 'e']);
const ALLOWED_OPERATORS = new Set(['+', '-', '*', '/', '^', 'unaryMinus', 'unaryPlus', '<', '>', '<=', '>=', '==', '!=']);

export type Variable = 'a' | 'z';

function checkTree(node: MathNode, name: string, variables: readonly string[]): void {
  node.traverse((n: MathNode, _path: string, parent: MathNode | null) => {
    switch (n.type) {
      case 'ConstantNode': {
        const v = (n as unknown as { value: unknown }).value;
        if (typeof v !== 'number') throw new FormulaError(name, `only numbers are allowed as constants, found ${JSON.stringify(v)}`);
        return;
      }
      case 'ParenthesisNode':
      case 'ConditionalNode':
      case 'RelationalNode':
        return;
      case 'OperatorNode': {
        const fn = (n as unknown as { fn: string; op: string });
        if (!ALLOWED_OPERATORS.has(fn.fn) && !ALLOWED_OPERATORS.has(fn.op)) {
          throw new FormulaError(name, `operator '${fn.op}' is not allowed`);
        }
        return;
      }
      case 'FunctionNode': {
        const fname = (n as unknown as { fn: { name?: string; type: string } }).fn;
        if (fname.type !== 'SymbolNode' || !fname.name || !ALLOWED_FUNCTIONS.has(fname.name)) {
          throw new FormulaError(name, `function '${fname.name ?? '?'}' is not allowed (allowed: ${[...ALLOWED_FUNCTIONS].join(', ')})`);
        }
        return;
      }
      case 'SymbolNode': {
        const sym = (n as unknown as { name: string }).name;
        // The function name symbol inside a FunctionNode was already checked above.
        if (parent && parent.type === 'FunctionNode' && (parent as unknown as { fn: MathNode }).fn === n) return;
        if (!variables.includes(sym) && !ALLOWED_CONSTANTS.has(sym)) {
          throw new FormulaError(name, `unknown symbol '${sym}' (use ${variables.join(' or ')}, pi, e)`);
        }
        return;
      }
      default:
        throw new FormulaError(name, `${n.type.replace(/Node$/, '').toLowerCase()} expressions are not allowed; write a formula in ${variables.join(', ')}`);
    }
  });
}

/**
 * Compile a formula string in the scale factor a (and z = 1/a − 1) into a function of a.
 * The result must be a finite real number; otherwise the call throws a FormulaError naming the
 * formula, the value of a and what came out. Compiled once; each call costs about a microsecond.
 */
export function compileFormula(source: string, name: string): (a: number) => number {
  if (typeof source !== 'string' || source.trim() === '') throw new FormulaError(name, 'the formula is empty');
  if (source.length > 2000) throw new FormulaError(name, 'the formula is longer than 2000 characters');
  let tree: MathNode;
  try {
    tree = parse(source);
  } catch (e) {
    throw new FormulaError(name, `cannot parse '${source}': ${(e as Error).message}`);
  }
  checkTree(tree, name, ['a', 'z']);
  const code = tree.compile();
  const scope = new Map<string, number>();
  const fn = (a: number): number => {
    scope.set('a', a);
    scope.set('z', 1 / a - 1);
    const v: unknown = code.evaluate(scope);
    if (typeof v === 'boolean') return v ? 1 : 0;
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      throw new FormulaError(name, `'${source}' gives ${typeof v === 'number' ? String(v) : 'a non-real value'} at a = ${a}`);
    }
    return v;
  };
  // Fail now, not deep inside an integration, if the formula cannot give a number today.
  fn(1);
  return fn;
}

/** Same as compileFormula but as a function of redshift z (emissivities are usually given in z). */
export function compileFormulaInZ(source: string, name: string): (z: number) => number {
  const f = compileFormula(source, name);
  return (z: number) => f(1 / (1 + z));
}

export type Outside = 'error' | 'clamp' | 'zero';

/**
 * Monotone piecewise-cubic (Fritsch & Carlson 1980, SIAM J. Numer. Anal. 17, 238; with the
 * harmonic-mean slopes of Fritsch & Butland 1984) interpolation of a table y(x), x strictly
 * increasing. Keeps the table's monotonicity (no overshoot), so a tabulated density or emissivity
 * never turns negative between positive points.
 */
export function tabulated(xs: ArrayLike<number>, ys: ArrayLike<number>, name: string, outside: Outside = 'error'): (x: number) => number {
  const n = xs.length;
  if (n !== ys.length) throw new FormulaError(name, `the table has ${n} x values but ${ys.length} y values`);
  if (n < 2) throw new FormulaError(name, 'the table needs at least two rows');
  const x = Float64Array.from(xs), y = Float64Array.from(ys);
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(x[i]) || !Number.isFinite(y[i])) throw new FormulaError(name, `row ${i + 1} is not a finite number`);
    if (i > 0 && !(x[i] > x[i - 1])) throw new FormulaError(name, `x must increase strictly; row ${i + 1} (${x[i]}) does not exceed row ${i} (${x[i - 1]})`);
  }
  const d = new Float64Array(n - 1), m = new Float64Array(n);
  for (let i = 0; i < n - 1; i++) d[i] = (y[i + 1] - y[i]) / (x[i + 1] - x[i]);
  if (n === 2) { m[0] = m[1] = d[0]; }
  else {
    for (let i = 1; i < n - 1; i++) {
      if (d[i - 1] * d[i] <= 0) m[i] = 0;
      else {
        const h0 = x[i] - x[i - 1], h1 = x[i + 1] - x[i];
        const w1 = 2 * h1 + h0, w2 = h1 + 2 * h0;
        m[i] = (w1 + w2) / (w1 / d[i - 1] + w2 / d[i]);
      }
    }
    // One-sided three-point ends, limited to keep monotonicity.
    const end = (h0: number, h1: number, d0: number, d1: number): number => {
      let s = ((2 * h0 + h1) * d0 - h0 * d1) / (h0 + h1);
      if (Math.sign(s) !== Math.sign(d0)) s = 0;
      else if (Math.sign(d0) !== Math.sign(d1) && Math.abs(s) > Math.abs(3 * d0)) s = 3 * d0;
      return s;
    };
    m[0] = end(x[1] - x[0], x[2] - x[1], d[0], d[1]);
    m[n - 1] = end(x[n - 1] - x[n - 2], x[n - 2] - x[n - 3], d[n - 2], d[n - 3]);
  }
  return (t: number): number => {
    if (!(t >= x[0] && t <= x[n - 1])) {
      if (outside === 'zero') return 0;
      if (outside === 'clamp') return t < x[0] ? y[0] : y[n - 1];
      throw new FormulaError(name, `x = ${t} is outside the table's range [${x[0]}, ${x[n - 1]}]`);
    }
    let lo = 0, hi = n - 2;
    while (lo < hi) { const mid = (lo + hi + 1) >> 1; if (x[mid] <= t) lo = mid; else hi = mid - 1; }
    const h = x[lo + 1] - x[lo], s = (t - x[lo]) / h;
    const s2 = s * s, s3 = s2 * s;
    return (2 * s3 - 3 * s2 + 1) * y[lo] + (s3 - 2 * s2 + s) * h * m[lo] + (-2 * s3 + 3 * s2) * y[lo + 1] + (s3 - s2) * h * m[lo + 1];
  };
}
