/**
 * Shapes of what a run hands back, as the output components render them. They mirror the sandbox
 * contract (RunResult outputs); kept structural so recipes and sweeps pages can pass their own rows.
 */
export interface ValueOutput { kind: 'value'; name: string; value: number | string | boolean | null; unit?: string }
export interface TableColumn { name: string; unit?: string }
export interface TableOutput { kind: 'table'; name: string; columns: TableColumn[]; rows: (number | string | null)[][] }
export interface PlotSeries { name: string; values: ArrayLike<number | null>; lower?: ArrayLike<number | null>; upper?: ArrayLike<number | null> }
export type AxisScale = 'linear' | 'log';
export interface PlotSpec {
  type: 'line' | 'scatter' | 'band' | 'heatmap';
  title?: string;
  x: ArrayLike<number | null>;
  series: PlotSeries[];
  xLabel?: string;
  yLabel?: string;
  xScale?: AxisScale;
  yScale?: AxisScale;
  /** heatmap only: the second axis and a flattened (row-major, y by x) or nested grid of values */
  y?: ArrayLike<number | null>;
  values?: ArrayLike<number | null> | ArrayLike<number | null>[];
  zLabel?: string;
}
export interface PlotOutput { kind: 'plot'; spec: PlotSpec }
export interface TextOutput { kind: 'text'; text: string }
export type OutputItem = ValueOutput | TableOutput | PlotOutput | TextOutput;

export interface RunErrorInfo { message: string; line?: number; column?: number; limit?: string }
