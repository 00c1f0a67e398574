/**
 * Pure mappings from console API data to chart.js datasets. The chart components only add
 * styling callbacks and options; everything a test needs to check lives here.
 */
import type { ConsoleLiquorCharts } from '../../../shared/console/liquors.js';
import type { UsageRow } from '../../../shared/console/usage.js';
import { paletteColour } from './chart-palette.js';

export interface XYPoint {
  x: number;
  y: number;
  /** The model warned that this point lies outside its data (drawn hollow, dashed). */
  extrapolated: boolean;
}

export interface LineDataset {
  label: string;
  data: XYPoint[];
  borderColor: string;
  backgroundColor: string;
  /** Null for the reference line, else the concentration or temperature it belongs to. */
  value: number | null;
}

/** "x = 0.30" — the mass fraction with two decimals (three when a finer step needs them). */
export function massFractionLabel(x: number): string {
  const two = x.toFixed(2);
  return `x = ${Number(two) === x ? two : x.toFixed(3)}`;
}

/** "60 °C" (no decimals unless the temperature has them). */
export function temperatureLabel(t: number): string {
  return `${Number.isInteger(t) ? t.toFixed(0) : t.toFixed(1)} °C`;
}

/**
 * Dühring lines: one dataset per concentration, x = boiling point of water, y = boiling point of
 * the solution at the same pressure, both °C, ordered by mass fraction. Points are sorted by the
 * water boiling point so the line never doubles back.
 */
export function duhringDatasets(duhring: ConsoleLiquorCharts['duhring']): LineDataset[] {
  return [...duhring.lines]
    .sort((a, b) => a.massFraction - b.massFraction)
    .map((line, i) => ({
      label: massFractionLabel(line.massFraction),
      value: line.massFraction,
      borderColor: paletteColour(i),
      backgroundColor: paletteColour(i),
      data: [...line.points]
        .sort((a, b) => a.waterBoilingPoint - b.waterBoilingPoint)
        .map((p) => ({ x: p.waterBoilingPoint, y: p.solutionBoilingPoint, extrapolated: p.extrapolated })),
    }));
}

/**
 * The pure-water reference of a Dühring plot: y = x over the span of the lines' water boiling
 * points (a solution with no solute boils where water does). Null when there are no points.
 */
export function duhringReference(duhring: ConsoleLiquorCharts['duhring']): LineDataset | null {
  const xs = duhring.lines.flatMap((l) => l.points.map((p) => p.waterBoilingPoint));
  if (xs.length === 0) return null;
  const lo = Math.min(...xs);
  const hi = Math.max(...xs);
  return {
    label: 'water (no rise)',
    value: null,
    borderColor: '#8a8580',
    backgroundColor: '#8a8580',
    data: [
      { x: lo, y: lo, extrapolated: false },
      { x: hi, y: hi, extrapolated: false },
    ],
  };
}

/**
 * Enthalpy–concentration curves: one dataset per temperature, x = mass fraction of solute,
 * y = specific enthalpy in kJ/kg (steam-table datum), ordered by temperature.
 */
export function enthalpyDatasets(enthalpy: ConsoleLiquorCharts['enthalpy']): LineDataset[] {
  return [...enthalpy.curves]
    .sort((a, b) => a.temperature - b.temperature)
    .map((curve, i) => ({
      label: temperatureLabel(curve.temperature),
      value: curve.temperature,
      borderColor: paletteColour(i),
      backgroundColor: paletteColour(i),
      data: [...curve.points]
        .sort((a, b) => a.massFraction - b.massFraction)
        .map((p) => ({ x: p.massFraction, y: p.enthalpy, extrapolated: p.extrapolated })),
    }));
}

/** Every UTC calendar day from `from` to `to` inclusive, as YYYY-MM-DD. */
export function daysBetween(from: string, to: string): string[] {
  const start = Date.parse(`${from}T00:00:00Z`);
  const end = Date.parse(`${to}T00:00:00Z`);
  if (!Number.isFinite(start) || !Number.isFinite(end) || end < start) return [];
  const days: string[] = [];
  for (let t = start; t <= end; t += 86_400_000) days.push(new Date(t).toISOString().slice(0, 10));
  return days;
}

export interface UsageSeries {
  labels: string[];
  units: number[];
  requests: number[];
  errors: number[];
}

/**
 * Day rows of a usage report (groupBy=day) as series over every day of the range: days the
 * roll-up has no row for are zero, so the bars keep their place on the calendar.
 */
export function usageDaySeries(rows: readonly UsageRow[], from: string, to: string): UsageSeries {
  const byDay = new Map(rows.map((r) => [r.group, r]));
  const labels = daysBetween(from, to);
  return {
    labels,
    units: labels.map((d) => byDay.get(d)?.units ?? 0),
    requests: labels.map((d) => byDay.get(d)?.requests ?? 0),
    errors: labels.map((d) => byDay.get(d)?.errors ?? 0),
  };
}

/** One series of a bar-and-line chart over days, with the axis it is drawn against. */
export interface DaySeriesDataset {
  type: 'bar' | 'line';
  label: string;
  data: number[];
  /** 'units' or 'requests': units and request counts never share an axis. */
  yAxisID: 'units' | 'requests';
}

/**
 * The usage chart's series: units as bars on the units axis; all requests and the failed ones
 * as lines on the requests axis, so 44 failures never stand beside 140 units as if comparable.
 */
export function usageChartSeries(series: UsageSeries): DaySeriesDataset[] {
  return [
    { type: 'bar', label: 'Units', data: series.units, yAxisID: 'units' },
    { type: 'line', label: 'Requests', data: series.requests, yAxisID: 'requests' },
    { type: 'line', label: 'Failed requests', data: series.errors, yAxisID: 'requests' },
  ];
}

/**
 * The overview's series: requests and failed requests as bars on the requests axis, units as a
 * line of straight segments on the units axis (a spline would overshoot between the daily points).
 */
export function overviewChartSeries(
  days: readonly { requests: number; units: number; errors: number }[],
): (DaySeriesDataset & { tension?: number })[] {
  return [
    { type: 'bar', label: 'Requests', data: days.map((d) => d.requests), yAxisID: 'requests' },
    { type: 'bar', label: 'Failed requests', data: days.map((d) => d.errors), yAxisID: 'requests' },
    { type: 'line', label: 'Units', data: days.map((d) => d.units), yAxisID: 'units', tension: 0 },
  ];
}
