/**
 * The sweep chart as a pure function: the indicator's long-run mean against the swept value,
 * one line from the clear start and one from the turbid start, each with its own colour,
 * marker shape and dash (Okabe & Ito blue, solid, circles; vermillion, dashed, triangles),
 * so the two never differ by colour alone. Bistable ranges are shaded and switch points
 * drawn as dotted vertical lines with their number, by a small plugin that reads its ranges
 * from the configuration (options.plugins.lakeledgerSweepBands). A value where a start did
 * not settle is a gap, never a zero.
 */
import type { Chart, ChartConfiguration, Plugin, TooltipItem } from 'chart.js';
import type { SweepDoc } from '$lib/engine/longrun/sweep';
import { CHART_INK, valueAxis, formatValue } from '$lib/ui/chart-config';
import { OKABE_ITO } from '$lib/ui/run-colours';
import { refinedRanges } from './sweep-words';

export interface SweepPoint {
  x: number;
  y: number | null;
}

export const BRANCH_STYLES = Object.freeze({
  clear: { colour: OKABE_ITO[0].hex, colourName: OKABE_ITO[0].name, dash: [] as number[], point: 'circle' as const, shapeName: 'circles, solid line' },
  turbid: { colour: OKABE_ITO[1].hex, colourName: OKABE_ITO[1].name, dash: [8, 4], point: 'triangle' as const, shapeName: 'triangles, dashed line' }
});

/** Grey shade of bistable ranges and ink of switch-point lines (never a branch colour). */
export const BAND_FILL = 'rgba(90, 90, 90, 0.14)';
export const SWITCH_INK = '#333333';

export interface SweepBandsOptions {
  ranges: [number, number][];
  switchPoints: number[];
}

export const SWEEP_BANDS_ID = 'lakeledgerSweepBands';

/** Shades each range and draws each switch point; reads chart.options.plugins[SWEEP_BANDS_ID]. */
export const sweepBandsPlugin: Plugin<'line'> = {
  id: SWEEP_BANDS_ID,
  beforeDatasetsDraw(chart: Chart) {
    const o = (chart.options.plugins as Record<string, unknown> | undefined)?.[SWEEP_BANDS_ID] as SweepBandsOptions | undefined;
    if (!o) return;
    const { ctx, chartArea } = chart;
    const x = chart.scales.x;
    const clamp = (px: number) => Math.min(chartArea.right, Math.max(chartArea.left, px));
    ctx.save();
    ctx.fillStyle = BAND_FILL;
    for (const [a, b] of o.ranges) {
      // a range of one swept value still gets a visible band of a few pixels
      const l = clamp(x.getPixelForValue(Math.min(a, b))) - 3;
      const r = clamp(x.getPixelForValue(Math.max(a, b))) + 3;
      ctx.fillRect(l, chartArea.top, r - l, chartArea.bottom - chartArea.top);
    }
    ctx.strokeStyle = SWITCH_INK;
    ctx.fillStyle = SWITCH_INK;
    ctx.lineWidth = 1;
    ctx.setLineDash([2, 3]);
    ctx.font = '12px system-ui, sans-serif';
    ctx.textAlign = 'center';
    o.switchPoints.forEach((v, i) => {
      const px = x.getPixelForValue(v);
      if (px < chartArea.left || px > chartArea.right) return;
      ctx.beginPath();
      ctx.moveTo(px, chartArea.top + 14);
      ctx.lineTo(px, chartArea.bottom);
      ctx.stroke();
      ctx.fillText(`S${i + 1} ${formatValue(v)}`, px, chartArea.top + 11);
    });
    ctx.restore();
  }
};

export interface SweepChartInput {
  doc: Pick<SweepDoc, 'values' | 'low' | 'high' | 'bistable' | 'switchPoints'>;
  /** Axis title of the swept quantity, e.g. "Pin, inflow total P [mg/m^3]" or "Q, scale factor". */
  xTitle: string;
  /** Axis title of the indicator, e.g. "Chl, growing-season mean [ug/L]". */
  yTitle: string;
}

function branch(values: number[], ys: (number | null)[]): SweepPoint[] {
  return values.map((x, i) => ({ x, y: ys[i] !== null && Number.isFinite(ys[i]) ? ys[i] : null }));
}

export function sweepChartConfig(input: SweepChartInput): ChartConfiguration<'line', SweepPoint[]> {
  const { doc } = input;
  if (doc.values.length === 0) throw new Error('sweepChartConfig: the sweep has no values');
  if (doc.low.length !== doc.values.length || doc.high.length !== doc.values.length) {
    throw new Error(`sweepChartConfig: ${doc.values.length} values but ${doc.low.length} and ${doc.high.length} results`);
  }
  const dataset = (key: 'clear' | 'turbid', label: string, ys: (number | null)[]) => {
    const s = BRANCH_STYLES[key];
    return {
      label,
      data: branch(doc.values, ys),
      borderColor: s.colour,
      backgroundColor: s.colour,
      borderDash: s.dash,
      borderWidth: 2,
      pointStyle: s.point,
      pointRadius: key === 'clear' ? 4 : 5,
      pointHoverRadius: 7,
      spanGaps: false
    };
  };
  const lo = Math.min(...doc.values);
  const hi = Math.max(...doc.values);
  // shaded as far as the switch points narrow each range, not only between the swept values
  const bands: SweepBandsOptions = { ranges: refinedRanges(doc), switchPoints: [...doc.switchPoints] };
  return {
    type: 'line',
    data: {
      datasets: [dataset('clear', 'From the clear start', doc.low), dataset('turbid', 'From the turbid start', doc.high)]
    },
    options: {
      animation: false,
      responsive: true,
      maintainAspectRatio: false,
      parsing: false,
      interaction: { mode: 'nearest', axis: 'x', intersect: false },
      scales: {
        x: {
          type: 'linear',
          min: lo,
          max: hi,
          title: { display: true, text: input.xTitle, color: CHART_INK.text },
          ticks: { color: CHART_INK.text, callback: (v) => formatValue(Number(v)) },
          grid: { color: CHART_INK.grid }
        },
        y: valueAxis(input.yTitle)
      },
      plugins: {
        legend: { labels: { usePointStyle: true, boxHeight: 8, color: CHART_INK.text } },
        tooltip: {
          callbacks: {
            title: (items: TooltipItem<'line'>[]) => (items.length ? `at ${formatValue((items[0].raw as SweepPoint).x)}` : ''),
            label: (item: TooltipItem<'line'>) => {
              const y = (item.raw as SweepPoint).y;
              return `${item.dataset.label}: ${y === null ? 'did not settle' : formatValue(y)}`;
            }
          }
        },
        ...({ [SWEEP_BANDS_ID]: bands } as Record<string, unknown>)
      }
    },
    plugins: [sweepBandsPlugin]
  };
}
