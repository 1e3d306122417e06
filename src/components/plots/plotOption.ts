/**
 * Turn a script's plot spec into an echarts option. Pure (colours passed in) so it can be tested and
 * reused by the sweeps page. Log axes drop non-positive points rather than failing the whole plot.
 */
import type { PlotSpec } from '../outputs/types';
import { formatNumber } from '../outputs/format';

export interface PlotColours {
  ink: string;
  ink2: string;
  ink3: string;
  line: string;
  surface: string;
  series: string[];
  /** heatmap ramp, low → high (defaults to a paper-to-teal ramp) */
  heat?: string[];
}

type Pt = [number, number | null];

function num(v: unknown): number | null {
  return typeof v === 'number' && Number.isFinite(v) ? v : null;
}

function pairs(x: ArrayLike<number | null>, y: ArrayLike<number | null>, logX: boolean, logY: boolean): Pt[] {
  const n = Math.min(x.length, y.length);
  const out: Pt[] = [];
  for (let i = 0; i < n; i++) {
    const xi = num(x[i]);
    let yi = num(y[i]);
    if (xi === null || (logX && xi <= 0)) continue;
    if (yi !== null && logY && yi <= 0) yi = null;
    out.push([xi, yi]);
  }
  return out;
}

function axis(label: string | undefined, scale: 'linear' | 'log' | undefined, c: PlotColours, which: 'x' | 'y') {
  return {
    type: scale === 'log' ? 'log' : 'value',
    name: label ?? '',
    nameLocation: 'middle' as const,
    nameGap: which === 'x' ? 28 : 52,
    nameTextStyle: { color: c.ink2, fontFamily: 'IBM Plex Sans', fontSize: 12 },
    scale: scale !== 'log',
    axisLine: { lineStyle: { color: c.ink3 } },
    axisTick: { lineStyle: { color: c.ink3 } },
    axisLabel: { color: c.ink2, fontFamily: 'IBM Plex Mono', fontSize: 11, formatter: (v: number) => formatNumber(v) },
    splitLine: { lineStyle: { color: c.line, type: 'dashed' as const } },
  };
}

/** The heatmap grid as rows (one per y), whether the spec gave nested rows or a flat y-major list. */
export function heatmapRows(spec: PlotSpec): (number | null)[][] {
  const nx = spec.x.length;
  const ny = spec.y?.length ?? 0;
  const vals = spec.values ?? spec.series[0]?.values ?? [];
  const first = (vals as ArrayLike<unknown>)[0];
  if (first !== undefined && typeof first === 'object' && first !== null) {
    return Array.from(vals as ArrayLike<ArrayLike<number | null>>, (r) => Array.from(r, num));
  }
  const flat = vals as ArrayLike<number | null>;
  const rows: (number | null)[][] = [];
  for (let j = 0; j < ny; j++) {
    const r: (number | null)[] = [];
    for (let i = 0; i < nx; i++) r.push(num(flat[j * nx + i]));
    rows.push(r);
  }
  return rows;
}

export function plotOption(spec: PlotSpec, c: PlotColours): Record<string, unknown> {
  const base = {
    animation: false,
    color: c.series,
    textStyle: { fontFamily: 'IBM Plex Sans', color: c.ink },
    title: spec.title
      ? { text: spec.title, left: 'center', top: 0, textStyle: { fontSize: 13, fontWeight: 500, color: c.ink } }
      : undefined,
    tooltip: {
      trigger: spec.type === 'heatmap' ? 'item' : 'axis',
      backgroundColor: c.surface,
      borderColor: c.line,
      textStyle: { color: c.ink, fontFamily: 'IBM Plex Mono', fontSize: 11 },
      valueFormatter: (v: unknown) => (Array.isArray(v) ? v.map(formatNumber).join(', ') : formatNumber(v)),
    },
    grid: { left: 70, right: 24, top: spec.title ? 52 : 36, bottom: 70, containLabel: false },
  };

  if (spec.type === 'heatmap') {
    const rows = heatmapRows(spec);
    const ys = spec.y ? Array.from(spec.y) : rows.map((_, j) => j);
    const data: [number, number, number | null][] = [];
    let lo = Infinity;
    let hi = -Infinity;
    rows.forEach((r, j) =>
      r.forEach((v, i) => {
        data.push([i, j, v]);
        if (v !== null) {
          lo = Math.min(lo, v);
          hi = Math.max(hi, v);
        }
      }),
    );
    if (!Number.isFinite(lo)) [lo, hi] = [0, 1];
    const cat = (label: string | undefined, vals: (number | null)[], which: 'x' | 'y') => ({
      ...axis(label, 'linear', c, which),
      type: 'category',
      // Four significant digits: grid coordinates, read at a glance.
      data: vals.map((v) => (typeof v === 'number' && Number.isFinite(v) ? String(Number(v.toPrecision(4))) : formatNumber(v))),
      splitLine: { show: false },
      axisLabel: { color: c.ink2, fontFamily: 'IBM Plex Mono', fontSize: 11 },
    });
    return {
      ...base,
      grid: { ...base.grid, right: 110 },
      xAxis: cat(spec.xLabel, Array.from(spec.x), 'x'),
      yAxis: cat(spec.yLabel, ys, 'y'),
      visualMap: {
        min: lo,
        max: hi,
        calculable: true,
        orient: 'vertical',
        right: 12,
        top: 'middle',
        itemHeight: 160,
        text: [spec.zLabel ?? spec.series[0]?.name ?? '', ''],
        textStyle: { color: c.ink2, fontSize: 11 },
        inRange: { color: c.heat ?? ['#f3efe2', '#9fcfc6', '#1f7a74', '#123f3c'] },
        formatter: (v: number) => formatNumber(v),
      },
      dataZoom: [{ type: 'inside', xAxisIndex: 0 }, { type: 'inside', yAxisIndex: 0 }],
      series: [{ type: 'heatmap', name: spec.series[0]?.name ?? 'value', data, progressive: 0 }],
    };
  }

  const logX = spec.xScale === 'log';
  const logY = spec.yScale === 'log';
  const series: Record<string, unknown>[] = [];
  spec.series.forEach((s, k) => {
    const colour = c.series[k % c.series.length];
    const main = pairs(spec.x, s.values, logX, logY);
    if ((spec.type === 'band' || s.lower || s.upper) && s.lower && s.upper) {
      // The band is drawn as a transparent lower line plus the stacked width, filled between.
      const lower: Pt[] = [];
      const width: Pt[] = [];
      const n = Math.min(spec.x.length, s.lower.length, s.upper.length);
      for (let i = 0; i < n; i++) {
        const xi = num(spec.x[i]);
        if (xi === null || (logX && xi <= 0)) continue;
        const lo = num(s.lower[i]);
        const up = num(s.upper[i]);
        const ok = lo !== null && up !== null && (!logY || lo > 0);
        lower.push([xi, ok ? lo : null]);
        width.push([xi, ok ? (up as number) - (lo as number) : null]);
      }
      const stack = `band-${k}`;
      series.push({
        type: 'line', name: s.name, data: lower, stack, symbol: 'none', lineStyle: { opacity: 0 },
        tooltip: { show: false }, silent: true, legendHoverLink: false,
      });
      series.push({
        type: 'line', name: s.name, data: width, stack, symbol: 'none', lineStyle: { opacity: 0 },
        areaStyle: { color: colour, opacity: 0.18 }, tooltip: { show: false }, silent: true,
      });
    }
    series.push({
      type: spec.type === 'scatter' ? 'scatter' : 'line',
      name: s.name,
      data: main,
      showSymbol: spec.type === 'scatter' || main.length <= 40,
      symbolSize: spec.type === 'scatter' ? 6 : 4,
      lineStyle: { width: 2 },
      connectNulls: false,
      z: 3,
    });
  });

  return {
    ...base,
    legend: {
      show: spec.series.length > 0,
      bottom: 0,
      icon: 'roundRect',
      itemWidth: 14,
      itemHeight: 4,
      textStyle: { color: c.ink2, fontSize: 12 },
    },
    xAxis: axis(spec.xLabel, spec.xScale, c, 'x'),
    yAxis: axis(spec.yLabel, spec.yScale, c, 'y'),
    dataZoom: [
      { type: 'inside', xAxisIndex: 0, filterMode: 'none' },
      { type: 'inside', yAxisIndex: 0, filterMode: 'none', zoomOnMouseWheel: 'shift', moveOnMouseMove: false },
    ],
    series,
  };
}

/** Columns for the plot's CSV: x, then each series (and its band). */
export function plotCsv(spec: PlotSpec): { columns: { name: string }[]; rows: (number | null)[][] } {
  if (spec.type === 'heatmap') {
    const rows = heatmapRows(spec);
    const ys = spec.y ? Array.from(spec.y) : rows.map((_, j) => j);
    const out: (number | null)[][] = [];
    rows.forEach((r, j) => r.forEach((v, i) => out.push([spec.x[i] ?? i, ys[j] ?? j, v])));
    return { columns: [{ name: spec.xLabel || 'x' }, { name: spec.yLabel || 'y' }, { name: spec.zLabel || spec.series[0]?.name || 'value' }], rows: out };
  }
  const columns = [{ name: spec.xLabel || 'x' }];
  const getters: ArrayLike<number | null>[] = [];
  for (const s of spec.series) {
    columns.push({ name: s.name });
    getters.push(s.values);
    if (s.lower && s.upper) {
      columns.push({ name: `${s.name} lower` }, { name: `${s.name} upper` });
      getters.push(s.lower, s.upper);
    }
  }
  const rows: (number | null)[][] = [];
  for (let i = 0; i < spec.x.length; i++) rows.push([spec.x[i], ...getters.map((g) => num(g[i]))]);
  return { columns, rows };
}
