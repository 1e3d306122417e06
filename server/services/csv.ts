import { parse } from 'csv-parse/sync';
import { cholesky, LikelihoodInputError } from '../kernel/likelihood';
import { REQUIRED_COLUMNS, type DatasetColumn, type DatasetKind } from '../../shared/schemas/datasets';

/**
 * Reading an uploaded CSV into a checked numeric table. Pure: no database, no HTTP, so every refusal can
 * be tested directly. A refusal names the file line (1-based, comment and blank lines counted, so it
 * matches what an editor shows), the column (1-based) and the reason.
 */

export type CsvProblemCode =
  | 'empty_file'
  | 'not_text'
  | 'csv_syntax'
  | 'missing_header'
  | 'empty_column_name'
  | 'duplicate_column'
  | 'missing_column'
  | 'ragged_row'
  | 'not_a_number'
  | 'bad_sigma'
  | 'negative_redshift'
  | 'no_rows'
  | 'covariance_size'
  | 'covariance_not_symmetric'
  | 'covariance_not_positive_definite';

export class CsvProblem extends Error {
  constructor(
    readonly code: CsvProblemCode,
    message: string,
    readonly row?: number,
    readonly column?: number,
    readonly columnName?: string,
  ) {
    super(message);
    this.name = 'CsvProblem';
  }
}

export interface ParsedTable {
  columns: DatasetColumn[];
  rows: number[][];
}

// A plain decimal number. Number() alone would also take '', ' ', '0x1f', 'Infinity' and '1_000'.
const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/** Bytes of an upload to text; refuses bytes that are not UTF-8 (a spreadsheet file sent by mistake). */
export function decodeUtf8(buf: Uint8Array, what = 'file'): string {
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(buf);
  } catch {
    throw new CsvProblem('not_text', `the ${what} is not UTF-8 text; save it as CSV (comma-separated values)`);
  }
}

interface Rec {
  record: string[];
  line: number;
}

function readRecords(text: string, what: string): Rec[] {
  if (text.replace(/^\uFEFF/, '').trim() === '') throw new CsvProblem('empty_file', `the ${what} is empty`);
  let out: { record: string[]; info: { lines: number } }[];
  try {
    out = parse(text, {
      bom: true,
      comment: '#',
      comment_no_infix: true,
      skip_empty_lines: true,
      trim: true,
      relax_column_count: true,
      info: true,
    }) as unknown as { record: string[]; info: { lines: number } }[];
  } catch (err) {
    const e = err as { message?: string; lines?: number };
    throw new CsvProblem('csv_syntax', `the ${what} is not valid CSV${e.lines ? ` (line ${e.lines})` : ''}: ${e.message ?? String(err)}`, e.lines);
  }
  const recs = out.map((r) => ({ record: r.record, line: r.info.lines }));
  if (recs.length === 0) throw new CsvProblem('empty_file', `the ${what} has no rows (only comments or blank lines)`);
  return recs;
}

/** `H [km/s/Mpc]` → {name: 'H', unit: 'km/s/Mpc'}. */
export function parseHeaderCell(cell: string): DatasetColumn {
  const m = /^(.*?)\s*\[([^\]]*)\]$/.exec(cell.trim());
  if (!m) return { name: cell.trim() };
  const unit = m[2].trim();
  return unit ? { name: m[1].trim(), unit } : { name: m[1].trim() };
}

function numberCell(cell: string, line: number, col: number, colName: string | undefined, what: string): number {
  if (!NUMBER.test(cell)) {
    const where = colName ? `column ${col} ("${colName}")` : `column ${col}`;
    const shown = cell === '' ? 'an empty cell' : `"${cell.length > 40 ? cell.slice(0, 40) + '…' : cell}"`;
    throw new CsvProblem('not_a_number', `${what === 'file' ? '' : what + ' '}line ${line}, ${where}: expected a number, found ${shown}`, line, col, colName);
  }
  return Number(cell);
}

/**
 * Parse a dataset CSV of the given kind. A header row is required; `#` starts a comment line. For the
 * measurement kinds the required columns are renamed to their canonical spelling (z, mu, H, fsigma8,
 * sigma) so the likelihoods find them whatever case the file used; other columns are kept as written.
 */
export function parseDatasetCsv(text: string, kind: DatasetKind): ParsedTable {
  const recs = readRecords(text, 'file');
  const header = recs[0];
  if (header.record.length > 0 && header.record.every((c) => NUMBER.test(c))) {
    throw new CsvProblem('missing_header', `line ${header.line}: a header row is required (the first row holds only numbers); expected e.g. ${expectedHeader(kind)}`, header.line);
  }
  const columns = header.record.map(parseHeaderCell);
  const seen = new Map<string, number>();
  columns.forEach((c, i) => {
    if (c.name === '') throw new CsvProblem('empty_column_name', `line ${header.line}, column ${i + 1}: the header cell is empty; every column needs a name`, header.line, i + 1);
    const key = c.name.toLowerCase();
    const first = seen.get(key);
    if (first !== undefined) {
      throw new CsvProblem('duplicate_column', `line ${header.line}, column ${i + 1}: the column name "${c.name}" already names column ${first + 1}`, header.line, i + 1, c.name);
    }
    seen.set(key, i);
  });
  for (const req of REQUIRED_COLUMNS[kind]) {
    const idx = seen.get(req.toLowerCase());
    if (idx === undefined) {
      const sep = columns.length === 1 ? [';', '\t', '|'].find((c) => columns[0].name.includes(c)) : undefined;
      const hint = sep ? `; the file seems to separate values with ${sep === '\t' ? 'tabs' : `"${sep}"`}, save it with commas` : '';
      throw new CsvProblem('missing_column', `line ${header.line}: a ${kind} dataset needs a column "${req}"; the header has ${columns.map((c) => `"${c.name}"`).join(', ')} (expected ${expectedHeader(kind)})${hint}`, header.line, undefined, req);
    }
    columns[idx] = { ...columns[idx], name: req };
  }

  const zIdx = kind === 'table' ? -1 : seen.get('z')!;
  const sIdx = kind === 'table' ? -1 : seen.get('sigma')!;
  const rows: number[][] = [];
  for (const { record, line } of recs.slice(1)) {
    if (record.length !== columns.length) {
      throw new CsvProblem('ragged_row', `line ${line}: has ${record.length} cells but the header has ${columns.length} columns`, line, Math.min(record.length, columns.length) + 1);
    }
    const row = record.map((cell, i) => numberCell(cell, line, i + 1, columns[i].name, 'file'));
    if (zIdx >= 0 && row[zIdx] < 0) {
      throw new CsvProblem('negative_redshift', `line ${line}, column ${zIdx + 1} ("z"): redshift must be ≥ 0, found ${record[zIdx]}`, line, zIdx + 1, 'z');
    }
    if (sIdx >= 0 && !(row[sIdx] > 0)) {
      throw new CsvProblem('bad_sigma', `line ${line}, column ${sIdx + 1} ("sigma"): the uncertainty must be > 0, found ${record[sIdx]}`, line, sIdx + 1, 'sigma');
    }
    rows.push(row);
  }
  if (rows.length === 0) throw new CsvProblem('no_rows', `the file has a header but no data rows`, header.line + 1);
  return { columns, rows };
}

function expectedHeader(kind: DatasetKind): string {
  const cols = REQUIRED_COLUMNS[kind];
  return cols.length ? `"${cols.join(',')}"` : 'a row of column names';
}

/**
 * Parse an n×n covariance matrix (no header; `#` comments allowed) and check it is symmetric and
 * positive definite. Positive definiteness is decided by attempting a Cholesky factorisation
 * C = L Lᵀ (Golub & Van Loan, Matrix Computations, §4.2): it succeeds exactly when every pivot is > 0.
 * Returns the symmetrised matrix (C + Cᵀ)/2, which removes rounding left by the file's decimal digits.
 */
export function parseCovarianceCsv(text: string, n: number): number[][] {
  const recs = readRecords(text, 'covariance file');
  if (recs.length !== n) {
    throw new CsvProblem('covariance_size', `the covariance matrix has ${recs.length} rows but the dataset has ${n} data rows; it must be ${n}×${n}`, recs[Math.min(recs.length, n)]?.line);
  }
  const C = recs.map(({ record, line }) => {
    if (record.length !== n) {
      throw new CsvProblem('covariance_size', `covariance line ${line}: has ${record.length} values; the matrix must be ${n}×${n}`, line, Math.min(record.length, n) + 1);
    }
    return record.map((cell, j) => numberCell(cell, line, j + 1, undefined, 'covariance'));
  });
  let scale = 0;
  for (const r of C) for (const v of r) scale = Math.max(scale, Math.abs(v));
  const tol = 1e-8 * scale;
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      if (Math.abs(C[i][j] - C[j][i]) > tol) {
        throw new CsvProblem('covariance_not_symmetric', `covariance line ${recs[i].line}, column ${j + 1}: C[${i + 1},${j + 1}] = ${C[i][j]} differs from C[${j + 1},${i + 1}] = ${C[j][i]}; the matrix must be symmetric`, recs[i].line, j + 1);
      }
    }
  }
  const S = C.map((r, i) => r.map((v, j) => (v + C[j][i]) / 2));
  const flat = new Float64Array(n * n);
  S.forEach((r, i) => flat.set(r, i * n));
  try {
    cholesky(flat, n);
  } catch (e) {
    if (!(e instanceof LikelihoodInputError) || e.row === undefined) throw e;
    const j = e.row - 1;
    throw new CsvProblem('covariance_not_positive_definite', `covariance line ${recs[j].line}, column ${j + 1}: the matrix is not positive definite (the Cholesky factorisation fails at row ${j + 1}); a covariance must have positive variances and consistent correlations`, recs[j].line, j + 1);
  }
  return S;
}

/** Turn a table back into CSV (used for copies made before an original text existed, and by tests). */
export function tableToCsv(columns: DatasetColumn[], rows: number[][]): string {
  const head = columns.map((c) => (c.unit ? `${c.name} [${c.unit}]` : c.name)).map(quote).join(',');
  return [head, ...rows.map((r) => r.map((v) => String(v)).join(','))].join('\n') + '\n';
}

function quote(s: string): string {
  return /[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}
