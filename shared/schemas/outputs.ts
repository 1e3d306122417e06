import { z } from 'zod';

/**
 * What a run produces, as stored in `runs.outputs` and sent to the client. The sandbox builds these
 * from show.value / show.table / show.plot / print; every number is finite or null (JSON has no NaN),
 * so non-finite values a script produces are stored as null.
 */
const num = z.number().nullable();

export const ValueOutputSchema = z.object({
  kind: z.literal('value'),
  name: z.string(),
  value: num,
  unit: z.string().optional(),
});

export const TableOutputSchema = z.object({
  kind: z.literal('table'),
  name: z.string(),
  columns: z.array(z.object({ name: z.string(), unit: z.string().optional() })),
  /** Row-major: rows[i][j] is column j of row i. */
  rows: z.array(z.array(num)),
});

export const PlotSeriesSchema = z.object({
  name: z.string(),
  values: z.array(num),
  lower: z.array(num).optional(),
  upper: z.array(num).optional(),
});

export const PlotSpecSchema = z.object({
  type: z.enum(['line', 'scatter', 'band', 'heatmap']),
  title: z.string().optional(),
  x: z.array(num),
  /** Heatmap only: the y grid; values is then a matrix values[iy][ix]. */
  y: z.array(num).optional(),
  series: z.array(PlotSeriesSchema),
  /** Heatmap only. */
  values: z.array(z.array(num)).optional(),
  xLabel: z.string().optional(),
  yLabel: z.string().optional(),
  xScale: z.enum(['linear', 'log']).optional(),
  yScale: z.enum(['linear', 'log']).optional(),
});

export const PlotOutputSchema = z.object({ kind: z.literal('plot'), spec: PlotSpecSchema });
export const TextOutputSchema = z.object({ kind: z.literal('text'), text: z.string() });

export const OutputItemSchema = z.discriminatedUnion('kind', [
  ValueOutputSchema,
  TableOutputSchema,
  PlotOutputSchema,
  TextOutputSchema,
]);

export type ValueOutput = z.infer<typeof ValueOutputSchema>;
export type TableOutput = z.infer<typeof TableOutputSchema>;
export type PlotSpec = z.infer<typeof PlotSpecSchema>;
export type PlotOutput = z.infer<typeof PlotOutputSchema>;
export type TextOutput = z.infer<typeof TextOutputSchema>;
export type OutputItem = z.infer<typeof OutputItemSchema>;

/** A recipe input declared by `param(name, {...})` in a script. */
export const ParamDeclarationSchema = z.object({
  name: z.string(),
  default: z.number(),
  min: z.number().optional(),
  max: z.number().optional(),
  unit: z.string().optional(),
  label: z.string().optional(),
});
export type ParamDeclaration = z.infer<typeof ParamDeclarationSchema>;
