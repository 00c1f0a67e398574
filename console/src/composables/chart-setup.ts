/**
 * What the console's charts share: the chart.js pieces they register (named one by one, never
 * `registerables`, so only these are bundled), the options every chart starts from, the theme
 * colours for text drawn on the canvas, and the hollow-and-dashed styling of extrapolated points.
 */
import {
  BarController,
  BarElement,
  CategoryScale,
  Chart as ChartJS,
  Legend,
  LinearScale,
  LineController,
  LineElement,
  PointElement,
  Tooltip,
  type ScriptableLineSegmentContext,
  type TooltipItem,
} from 'chart.js';
import { computed } from 'vue';
import { useTheme } from 'vuetify';
import type { LineDataset, XYPoint } from './chart-data.js';

/** Registers what a line chart on linear axes needs (the liquor charts). */
export function registerLineChart(): void {
  ChartJS.register(LineController, LineElement, PointElement, LinearScale, Tooltip, Legend);
}

/** Registers what bars with a line over them on a category axis need (overview, usage). */
export function registerBarAndLineChart(): void {
  registerLineChart();
  ChartJS.register(BarController, BarElement, CategoryScale);
}

/** Fills its box, which sets the height; drawn at once, without animation. */
export const baseChartOptions = {
  responsive: true,
  maintainAspectRatio: false,
  animation: false,
} as const;

/** The current Vuetify theme's colours, as strings chart.js accepts. */
export function useChartThemeColours() {
  const theme = useTheme();
  return computed(() => {
    const c = theme.global.current.value.colors;
    return {
      primary: String(c.primary),
      secondary: String(c.secondary),
      error: String(c.error),
      text: String(c['on-surface']),
    };
  });
}

/** Dashed where either end of a segment is extrapolated (looked up by dataset and point index). */
function dashedWhenExtrapolated(datasets: () => { data: XYPoint[] }[]) {
  return {
    borderDash: (ctx: ScriptableLineSegmentContext) => {
      const data = datasets()[ctx.datasetIndex]?.data;
      return data?.[ctx.p0DataIndex]?.extrapolated || data?.[ctx.p1DataIndex]?.extrapolated
        ? [6, 4]
        : undefined;
    },
  };
}

/**
 * A liquor curve as drawn: points hollow and segments dashed where the model extrapolates.
 * `datasets` returns the chart's datasets as drawn, for the segment callback to look points up.
 */
export function curveWithExtrapolation(line: LineDataset, datasets: () => { data: XYPoint[] }[]) {
  return {
    ...line,
    parsing: false as const,
    borderWidth: 2,
    pointRadius: 2.5,
    pointBackgroundColor: line.data.map((p) => (p.extrapolated ? 'transparent' : line.borderColor)),
    segment: dashedWhenExtrapolated(datasets),
  };
}

/** Tooltip "<dataset>: <point> (extrapolated)", the note only on extrapolated points. */
export function extrapolationTooltip(describe: (point: XYPoint) => string) {
  return {
    callbacks: {
      label: (item: TooltipItem<'line'>) => {
        const p = item.raw as XYPoint;
        const note = p.extrapolated ? ' (extrapolated)' : '';
        return `${item.dataset.label}: ${describe(p)}${note}`;
      },
    },
  };
}
