/**
 * Pure helpers behind the output components: number formatting, CSV, the plot-spec → echarts option
 * mapping and the command bar's ranking. Expected values are worked out by hand from the inputs
 * (common practice for formatting/CSV: RFC 4180 quoting; echarts option shapes from its documented
 * `series.data` [x, y] pairs and `xAxis.type: 'log'`).
 */
import { describe, expect, it } from 'vitest';
import { formatNumber, csvNumber } from '../../src/components/outputs/format';
import { toCsv } from '../../src/components/outputs/download';
import { heatmapRows, plotCsv, plotOption, type PlotColours } from '../../src/components/plots/plotOption';
import { rankActions } from '../../src/components/command-bar/rank';
import type { CommandAction } from '../../src/stores/commandBar';

const colours: PlotColours = { ink: '#000', ink2: '#111', ink3: '#222', line: '#333', surface: '#fff', series: ['#1f7a74', '#d99a2b'] };

describe('formatNumber', () => {
  it('keeps six significant digits and switches to exponents outside [1e-3, 1e6)', () => {
    expect(formatNumber(460.30012345)).toBe('460.3');
    expect(formatNumber(13.46171234)).toBe('13.4617');
    expect(formatNumber(2.5e-5)).toBe('2.5000e-5');
    expect(formatNumber(1.23456789e7)).toBe('1.2346e7');
    expect(formatNumber(12345670)).toBe('12345670');
    expect(formatNumber(42)).toBe('42');
    expect(formatNumber(null)).toBe('—');
    expect(formatNumber(Number.NaN)).toBe('NaN');
  });
});

describe('CSV', () => {
  it('writes full precision, units in the header and RFC 4180 quoting', () => {
    const csv = toCsv([{ name: 'z' }, { name: 'd_L', unit: 'Mpc' }, { name: 'note, quoted' }], [[0.1, 460.30012345, null]]);
    expect(csv).toBe('z,d_L [Mpc],"note, quoted"\n0.1,460.30012345,\n');
    expect(csvNumber('say "hi"')).toBe('"say ""hi"""');
  });
});

describe('plotOption', () => {
  it('maps x and series values to [x, y] pairs with labelled value axes', () => {
    const o = plotOption({ type: 'line', x: [0.1, 0.2], series: [{ name: 'dL', values: [460, 980] }], xLabel: 'z', yLabel: 'd_L [Mpc]' }, colours) as {
      xAxis: { type: string; name: string };
      yAxis: { type: string; name: string };
      series: { type: string; data: unknown[] }[];
    };
    expect(o.xAxis).toMatchObject({ type: 'value', name: 'z' });
    expect(o.yAxis).toMatchObject({ type: 'value', name: 'd_L [Mpc]' });
    expect(o.series).toHaveLength(1);
    expect(o.series[0].data).toEqual([[0.1, 460], [0.2, 980]]);
  });

  it('on log axes drops points with x ≤ 0 and blanks y ≤ 0 instead of failing', () => {
    const o = plotOption({ type: 'scatter', x: [0, 1, 10], series: [{ name: 's', values: [5, -1, 3] }], xScale: 'log', yScale: 'log' }, colours) as {
      xAxis: { type: string };
      series: { data: unknown[] }[];
    };
    expect(o.xAxis.type).toBe('log');
    expect(o.series[0].data).toEqual([[1, null], [10, 3]]);
  });

  it('draws a band as a stacked lower edge plus its width under the central line', () => {
    const o = plotOption({ type: 'band', x: [1, 2], series: [{ name: 'H', values: [70, 80], lower: [65, 74], upper: [75, 86] }] }, colours) as {
      series: { data: unknown[]; stack?: string }[];
    };
    expect(o.series).toHaveLength(3);
    expect(o.series[0].data).toEqual([[1, 65], [2, 74]]);
    expect(o.series[1].data).toEqual([[1, 10], [2, 12]]);
    expect(o.series[0].stack).toBe(o.series[1].stack);
    expect(o.series[2].data).toEqual([[1, 70], [2, 80]]);
  });

  it('reads heatmap grids nested (values[iy][ix]) or flat y-major, and exports x, y, value rows', () => {
    const nested = { type: 'heatmap' as const, x: [1, 2, 3], y: [10, 20], values: [[1, 2, 3], [4, 5, 6]], series: [] };
    const flat = { type: 'heatmap' as const, x: [1, 2, 3], y: [10, 20], values: [1, 2, 3, 4, 5, 6], series: [] };
    expect(heatmapRows(nested)).toEqual([[1, 2, 3], [4, 5, 6]]);
    expect(heatmapRows(flat)).toEqual(heatmapRows(nested));
    expect(plotCsv(nested).rows[4]).toEqual([2, 20, 5]);
  });
});

describe('command bar ranking', () => {
  const a = (id: string, title: string, section: string, keywords = ''): CommandAction => ({ id, title, section, keywords, run: () => undefined });
  const actions = [
    a('snippet.plot', 'Insert: Line plot of a quantity against redshift', 'Snippets', 'snippet insert plot'),
    a('snippet.energy', 'Insert: Energy conditions report', 'Snippets', 'snippet insert energy conditions null weak dominant'),
    a('open.notebook.1', 'Distances for planning the Aurora Deep Field', 'Notebooks'),
    a('app.theme', 'Switch light / dark theme', 'Settings', 'theme dark light'),
  ];

  it('puts the best match of several words first, not a one-word match', () => {
    expect(rankActions(actions, 'insert plot', () => Infinity)[0].action.id).toBe('snippet.plot');
    expect(rankActions(actions, 'dark theme', () => Infinity)[0].action.id).toBe('app.theme');
  });

  it('with no query lists recent items first, newest first', () => {
    const recent = ['app.theme', 'open.notebook.1'];
    const r = rankActions(actions, '', (id) => (recent.includes(id) ? recent.indexOf(id) : Infinity));
    expect(r.slice(0, 2).map((x) => x.action.id)).toEqual(recent);
    expect(r[0].recent).toBe(true);
    expect(r[2].recent).toBe(false);
  });
});
