import ts from 'typescript';
import type { ParamDeclaration } from '../../shared/schemas/recipes';

/**
 * Reading a recipe's inputs from its source without running it. Every `param(name, {...})` call must have
 * literal arguments, so that what the form shows is exactly what the script will ask for; anything else
 * is refused with the 1-based line and column of the offending expression.
 */

export class ParamProblem extends Error {
  constructor(
    readonly code: 'syntax_error' | 'invalid_param_declaration',
    message: string,
    readonly line: number,
    readonly column: number,
  ) {
    super(message);
    this.name = 'ParamProblem';
  }
}

const NUMERIC_KEYS = new Set(['default', 'min', 'max']);
const STRING_KEYS = new Set(['unit', 'label']);
const PARAM_NAME = /^[A-Za-z_][A-Za-z0-9_]*$/;

export function extractParamDeclarations(source: string, language: 'ts' | 'js' = 'ts'): ParamDeclaration[] {
  const sf = ts.createSourceFile(
    language === 'ts' ? 'recipe.ts' : 'recipe.js',
    source,
    ts.ScriptTarget.ES2022,
    true,
    language === 'ts' ? ts.ScriptKind.TS : ts.ScriptKind.JS,
  );
  const pos = (node: ts.Node | number) => {
    const at = typeof node === 'number' ? node : node.getStart(sf);
    const lc = sf.getLineAndCharacterOfPosition(at);
    return { line: lc.line + 1, column: lc.character + 1 };
  };
  const fail = (node: ts.Node, message: string): never => {
    const p = pos(node);
    throw new ParamProblem('invalid_param_declaration', `line ${p.line}, column ${p.column}: ${message}`, p.line, p.column);
  };

  // parseDiagnostics is not in the public typings, but it is the parser's own list of syntax errors and
  // costs nothing extra; a script that does not parse cannot have its declarations trusted.
  const diags = (sf as unknown as { parseDiagnostics?: readonly ts.Diagnostic[] }).parseDiagnostics ?? [];
  if (diags.length > 0) {
    const d = diags[0];
    const p = pos(d.start ?? 0);
    const text = ts.flattenDiagnosticMessageText(d.messageText, '\n');
    throw new ParamProblem('syntax_error', `line ${p.line}, column ${p.column}: syntax error: ${text}`, p.line, p.column);
  }

  const out: ParamDeclaration[] = [];
  const byName = new Map<string, ParamDeclaration>();

  const numberOf = (e: ts.Expression, key: string): number => {
    if (ts.isParenthesizedExpression(e)) return numberOf(e.expression, key);
    if (ts.isNumericLiteral(e)) return Number(e.text);
    if (ts.isPrefixUnaryExpression(e) && ts.isNumericLiteral(e.operand)) {
      if (e.operator === ts.SyntaxKind.MinusToken) return -Number(e.operand.text);
      if (e.operator === ts.SyntaxKind.PlusToken) return Number(e.operand.text);
    }
    return fail(e, `param option "${key}" must be a number literal (e.g. 70 or -1.5), not "${e.getText(sf)}"`);
  };
  const stringOf = (e: ts.Expression, key: string): string => {
    if (ts.isStringLiteral(e) || ts.isNoSubstitutionTemplateLiteral(e)) return e.text;
    return fail(e, `param option "${key}" must be a string literal, not "${e.getText(sf)}"`);
  };

  const visit = (node: ts.Node): void => {
    if (ts.isCallExpression(node) && ts.isIdentifier(node.expression) && node.expression.text === 'param') {
      const args = node.arguments;
      if (args.length < 1 || args.length > 2) fail(node, `param() takes a name and an options object, e.g. param('H0', {default: 70, min: 50, max: 90})`);
      const nameArg = args[0];
      if (args.length < 2) fail(node, `param() needs an options object with a default, e.g. param('H0', {default: 70, min: 50, max: 90})`);
      if (!(ts.isStringLiteral(nameArg) || ts.isNoSubstitutionTemplateLiteral(nameArg))) {
        fail(nameArg, `the first argument of param() must be a string literal naming the input`);
      }
      const name = (nameArg as ts.StringLiteral).text;
      if (!PARAM_NAME.test(name)) fail(nameArg, `param name "${name}" must be an identifier (letters, digits and "_", not starting with a digit)`);
      const p = pos(node);
      const decl: Partial<ParamDeclaration> & { name: string; line: number; column: number } = { name, line: p.line, column: p.column };
      const opts = args[1];
      if (opts) {
        if (!ts.isObjectLiteralExpression(opts)) fail(opts, `the options of param("${name}") must be an object literal, e.g. {default: 70, min: 50, max: 90}`);
        const seen = new Set<string>();
        for (const prop of (opts as ts.ObjectLiteralExpression).properties) {
          if (!ts.isPropertyAssignment(prop)) fail(prop, `param("${name}") options must be plain "key: value" entries`);
          const pa = prop as ts.PropertyAssignment;
          const key = ts.isIdentifier(pa.name) || ts.isStringLiteral(pa.name) ? pa.name.text : fail(pa.name, `param("${name}") option keys must be plain names`);
          if (seen.has(key)) fail(pa.name, `param("${name}") gives "${key}" twice`);
          seen.add(key);
          if (NUMERIC_KEYS.has(key)) {
            const v = numberOf(pa.initializer, key);
            if (!Number.isFinite(v)) fail(pa.initializer, `param("${name}") option "${key}" must be finite`);
            (decl as Record<string, unknown>)[key] = v;
          } else if (STRING_KEYS.has(key)) {
            (decl as Record<string, unknown>)[key] = stringOf(pa.initializer, key);
          } else {
            fail(pa.name, `param("${name}") has an unknown option "${key}"; allowed: default, min, max, unit, label`);
          }
        }
      }
      // The sandbox's param() needs a default so that a script always runs on its own.
      if (decl.default === undefined) fail(node, `param("${name}") needs a default, e.g. param('${name}', {default: 1, min: 0, max: 2})`);
      if (decl.min !== undefined && decl.max !== undefined && decl.min > decl.max) fail(node, `param("${name}"): min ${decl.min} is above max ${decl.max}`);
      if (decl.min !== undefined && decl.default! < decl.min) fail(node, `param("${name}"): default ${decl.default} is below min ${decl.min}`);
      if (decl.max !== undefined && decl.default! > decl.max) fail(node, `param("${name}"): default ${decl.default} is above max ${decl.max}`);
      const prev = byName.get(name);
      if (prev) fail(node, `param("${name}") is declared twice (first at line ${prev.line}); one name, one input`);
      const full = decl as ParamDeclaration;
      byName.set(name, full);
      out.push(full);
    }
    ts.forEachChild(node, visit);
  };
  visit(sf);
  return out;
}

export class InputProblem extends Error {
  constructor(readonly field: string, message: string) {
    super(message);
    this.name = 'InputProblem';
  }
}

/**
 * Check a run's inputs against the declarations and fill in defaults. Unknown, missing and out-of-range
 * inputs are refused by name before anything runs.
 */
export function checkInputs(decls: readonly ParamDeclaration[], inputs: Record<string, number>): Record<string, number> {
  const declared = new Map(decls.map((d) => [d.name, d]));
  for (const name of Object.keys(inputs)) {
    if (!declared.has(name)) {
      const known = decls.length ? decls.map((d) => d.name).join(', ') : 'none';
      throw new InputProblem(`inputs.${name}`, `unknown input "${name}"; this recipe declares: ${known}`);
    }
  }
  const out: Record<string, number> = {};
  for (const d of decls) {
    const given = Object.prototype.hasOwnProperty.call(inputs, d.name) ? inputs[d.name] : undefined;
    // Declarations always carry a default today; the required-input branch guards older or foreign ones.
    const v = given ?? (d as { default?: number }).default;
    const unit = d.unit ? ` ${d.unit}` : '';
    if (v === undefined) throw new InputProblem(`inputs.${d.name}`, `input "${d.name}" is required (it has no default)`);
    if (!Number.isFinite(v)) throw new InputProblem(`inputs.${d.name}`, `input "${d.name}" must be a finite number`);
    if (d.min !== undefined && v < d.min) throw new InputProblem(`inputs.${d.name}`, `input "${d.name}" = ${v}${unit} is below its minimum ${d.min}${unit}`);
    if (d.max !== undefined && v > d.max) throw new InputProblem(`inputs.${d.name}`, `input "${d.name}" = ${v}${unit} is above its maximum ${d.max}${unit}`);
    out[d.name] = v;
  }
  return out;
}
