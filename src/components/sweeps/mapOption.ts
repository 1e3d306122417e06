/**
 * The echarts option for a sweep's value over two inputs: coloured cells (a custom series, so the
 * axes stay numeric and can be logarithmic), contour lines from contours.ts, and for a χ² the
 * Δχ² = 2.30 / 6.18 confidence contours around the minimum with the best point marked.
 */
import type { CustomSeriesRenderItemAPI, CustomSeriesRenderItemParams } from 'echarts';
import { formatNumber } from '../outputs/format';
import { CONFIDENCE_LEVELS, colourRange, gridMinimum, isolines, levelsFor, type Point, type Scale } from './contours';

export interface MapColours {
  ink: string;
  ink2: string;
  ink3: string;
  line: string;
  surface: string;
  ramp: string[];
  contour: string;
  confidence: [string, string];
  best: string;
}

export interface MapInput {
  xs: number[];
  ys: number[];
  /** values[ix + iy·nx], NaN where a point has not reported */
  values: Float64Array;
  xLabel: string;
  yLabel: string;
  zLabel: string;
  xScale: Scale;
  yScale: Scale;
  chi2: boolean;
}

export interface MapSummary {
  min: { value: number; x: number; y: number } | null;
  /** the contour levels actually drawn */
  levels: { value: number; label: string }[];
  /** the values the colour ramp spans; for a χ² only the low end (see colourRange) */
  colour: { min: number; max: number; clipped: boolean };
}

/** Cell edges: half-way between neighbouring samples (geometrically on a log axis). */
function edges(a: number[], scale: Scale): number[] {
  const n = a.length;
  const mid = (p: number, q: number) => (scale === 'log' && p > 0 && q > 0 ? Math.sqrt(p * q) : (p + q) / 2);
  if (n === 1) {
    const v = a[0]!;
    const d = scale === 'log' ? v * 0.1 : Math.abs(v) * 0.05 || 0.5;
    return scale === 'log' ? [v / 1.1, v * 1.1] : [v - d, v + d];
  }
  const out: number[] = [];
  for (let i = 0; i <= n; i++) {
    if (i === 0) out.push(scale === 'log' && a[0]! > 0 && a[1]! > 0 ? a[0]! ** 2 / mid(a[0]!, a[1]!) : 2 * a[0]! - mid(a[0]!, a[1]!));
    else if (i === n) out.push(scale === 'log' && a[n - 1]! > 0 ? a[n - 1]! ** 2 / mid(a[n - 2]!, a[n - 1]!) : 2 * a[n - 1]! - mid(a[n - 2]!, a[n - 1]!));
    else out.push(mid(a[i - 1]!, a[i]!));
  }
  return out;
}

export function mapOption(m: MapInput, c: MapColours): { option: Record<string, unknown>; summary: MapSummary } {
  const nx = m.xs.length;
  const ex = edges(m.xs, m.xScale);
  const ey = edges(m.ys, m.yScale);
  const cells: [number, number, number, number, number, number, number][] = [];
  let lo = Infinity;
  let hi = -Infinity;
  for (let iy = 0; iy < m.ys.length; iy++) {
    for (let ix = 0; ix < nx; ix++) {
      const v = m.values[ix + iy * nx]!;
      if (!Number.isFinite(v)) continue;
      lo = Math.min(lo, v);
      hi = Math.max(hi, v);
      cells.push([m.xs[ix]!, m.ys[iy]!, v, ex[ix]!, ex[ix + 1]!, ey[iy]!, ey[iy + 1]!]);
    }
  }
  if (!Number.isFinite(lo)) [lo, hi] = [0, 1];
  if (hi === lo) hi = lo + 1;
  const colour = colourRange(lo, hi, m.chi2);

  const gmin = gridMinimum(m.values, nx);
  const min = gmin ? { value: gmin.value, x: m.xs[gmin.ix]!, y: m.ys[gmin.iy]! } : null;
  const scales = { x: m.xScale, y: m.yScale };
  const levels: MapSummary['levels'] = [];
  const series: Record<string, unknown>[] = [
    {
      type: 'custom',
      name: m.zLabel,
      data: cells,
      encode: { x: [3, 4], y: [5, 6], tooltip: [0, 1, 2] },
      dimensions: [m.xLabel, m.yLabel, m.zLabel, 'x0', 'x1', 'y0', 'y1'],
      renderItem: (_params: CustomSeriesRenderItemParams, api: CustomSeriesRenderItemAPI) => {
        const p0 = api.coord([api.value(3), api.value(5)]);
        const p1 = api.coord([api.value(4), api.value(6)]);
        return {
          type: 'rect',
          shape: { x: Math.min(p0[0]!, p1[0]!), y: Math.min(p0[1]!, p1[1]!), width: Math.abs(p1[0]! - p0[0]!) + 0.5, height: Math.abs(p1[1]! - p0[1]!) + 0.5 },
          style: { fill: api.visual('color') as string },
        };
      },
      z: 1,
      progressive: 0,
    },
  ];

  const legend: Record<string, unknown>[] = [];
  const lineSeries = (name: string, lines: Point[][], style: { color: string; width: number; type?: string; opacity?: number; shadowColor?: string }) => {
    const common = { type: 'line', name, showSymbol: false, symbol: 'none', smooth: false, color: style.color, itemStyle: { color: style.color }, lineStyle: { ...style, shadowBlur: style.shadowColor ? 3 : 0 }, silent: true, z: 3, tooltip: { show: false }, animation: false };
    for (const data of lines) series.push({ ...common, data });
    // Keep a legend entry even when the level is not reached on this grid.
    if (!lines.length) series.push({ ...common, data: [] });
    // A light line needs an outline to show in the legend on a light page.
    legend.push({ name, icon: 'rect', itemStyle: { color: style.color, borderColor: c.ink3, borderWidth: 0.5 } });
  };

  if (m.chi2 && min) {
    CONFIDENCE_LEVELS.forEach((l, k) => {
      const level = min.value + l.delta;
      levels.push({ value: level, label: `Δχ² = ${l.delta.toFixed(2)} (${l.label})` });
      lineSeries(`Δχ² = ${l.delta.toFixed(2)} · ${l.label}`, isolines(m.values, m.xs, m.ys, level, scales), {
        color: c.confidence[k],
        width: k === 0 ? 2.4 : 2,
        type: k === 0 ? 'solid' : 'dashed',
        shadowColor: 'rgba(0,0,0,0.55)',
      });
    });
  } else {
    const ls = levelsFor(m.values, 6);
    const all: Point[][] = [];
    for (const level of ls) {
      levels.push({ value: level, label: formatNumber(level) });
      all.push(...isolines(m.values, m.xs, m.ys, level, scales));
    }
    lineSeries('contours', all, { color: c.contour, width: 1, opacity: 0.8 });
  }

  const STAR = 'path://M0,-10L2.4,-3.1L9.5,-3.1L3.8,1.2L5.9,8.1L0,4L-5.9,8.1L-3.8,1.2L-9.5,-3.1L-2.4,-3.1Z';
  if (min) {
    const name = m.chi2 ? 'best point (χ² min)' : 'minimum';
    series.push({
      type: 'scatter',
      name,
      data: [[min.x, min.y, min.value]],
      symbol: STAR,
      symbolSize: 18,
      itemStyle: { color: c.best, borderColor: c.surface, borderWidth: 1.5 },
      z: 5,
      tooltip: {
        formatter: () => `${m.chi2 ? 'best point' : 'minimum'}<br/>${m.xLabel} = ${formatNumber(min.x)}<br/>${m.yLabel} = ${formatNumber(min.y)}<br/>${m.zLabel} = ${formatNumber(min.value)}`,
      },
    });
  }

  const axis = (label: string, scale: Scale, e: number[], which: 'x' | 'y') => ({
    type: scale === 'log' ? 'log' : 'value',
    name: label,
    nameLocation: 'middle',
    nameGap: which === 'x' ? 30 : 56,
    nameTextStyle: { color: c.ink2, fontFamily: 'IBM Plex Sans', fontSize: 12 },
    min: Math.min(e[0]!, e[e.length - 1]!),
    max: Math.max(e[0]!, e[e.length - 1]!),
    axisLine: { lineStyle: { color: c.ink3 } },
    axisTick: { lineStyle: { color: c.ink3 } },
    // The axis ends are cell edges, not sample values: label only the ticks inside.
    axisLabel: { color: c.ink2, fontFamily: 'IBM Plex Mono', fontSize: 11, showMinLabel: false, showMaxLabel: false, formatter: (v: number) => formatNumber(v) },
    splitLine: { show: false },
  });

  const option = {
    animation: false,
    textStyle: { fontFamily: 'IBM Plex Sans', color: c.ink },
    // A clipped ramp's top label reads "≥ …" and needs the room.
    grid: { left: 78, right: colour.clipped ? 128 : 110, top: 20, bottom: 84 },
    tooltip: {
      trigger: 'item',
      backgroundColor: c.surface,
      borderColor: c.line,
      textStyle: { color: c.ink, fontFamily: 'IBM Plex Mono', fontSize: 11 },
      formatter: (p: { value?: unknown[]; seriesType?: string }) => {
        const v = p.value;
        if (!Array.isArray(v)) return '';
        return `${m.xLabel} = ${formatNumber(v[0])}<br/>${m.yLabel} = ${formatNumber(v[1])}<br/>${m.zLabel} = ${formatNumber(v[2])}`;
      },
    },
    legend: {
      bottom: 0,
      icon: 'roundRect',
      itemWidth: 16,
      itemHeight: 4,
      textStyle: { color: c.ink2, fontSize: 12 },
      itemGap: 18,
      data: legend,
    },
    visualMap: {
      type: 'continuous',
      seriesIndex: 0,
      dimension: 2,
      min: colour.min,
      max: colour.max,
      // echarts treats a range that touches max as unbounded above (unboundedRange, on by default), so
      // cells beyond a clipped range take the ramp's last colour; the tooltip has their value.
      calculable: true,
      orient: 'vertical',
      right: 8,
      top: 'middle',
      itemHeight: 200,
      text: [m.zLabel, ''],
      textStyle: { color: c.ink2, fontSize: 11 },
      inRange: { color: c.ramp },
      formatter: (v: number) => (colour.clipped && v >= colour.max ? `≥ ${formatNumber(v)}` : formatNumber(v)),
    },
    xAxis: axis(m.xLabel, m.xScale, ex, 'x'),
    yAxis: axis(m.yLabel, m.yScale, ey, 'y'),
    series,
  };
  return { option, summary: { min, levels, colour } };
}
