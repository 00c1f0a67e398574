/**
 * The liquor library's chart mapping, fed with seawater values from IAPWS-08 (python3-iapws,
 * offline; fixtures and their generating scripts in tests/fixtures/custom-liquor/): the charts
 * must show one Dühring line per concentration and one enthalpy curve per temperature, with
 * every published value carried through unchanged.
 */
import { mount } from '@vue/test-utils';
import { describe, expect, it, vi } from 'vitest';
import { createVuetify } from 'vuetify';
import type { ConsoleLiquorCharts } from '../../shared/console/liquors.js';
import boiling from '../fixtures/custom-liquor/seawater-boiling-points.json' with { type: 'json' };
import enthalpyFixture from '../fixtures/custom-liquor/seawater-enthalpy.json' with { type: 'json' };
import {
  duhringDatasets,
  duhringReference,
  enthalpyDatasets,
  massFractionLabel,
} from '../../console/src/composables/chart-data.js';

// vue-chartjs draws on a canvas happy-dom does not have: capture what the component hands it.
const seen: { data?: { datasets: { label: string; data: { x: number; y: number }[] }[] } } = {};
vi.mock('vue-chartjs', async () => {
  const { defineComponent, h } = await import('vue');
  const Line = defineComponent({
    props: { data: { type: Object, required: true }, options: { type: Object, required: true } },
    setup(props) {
      seen.data = props.data as typeof seen.data;
      return () => h('div', { class: 'fake-chart' });
    },
  });
  return { Line, Bar: Line };
});

/** K → °C: the Celsius scale is defined as T − 273.15 K (SI Brochure, 9th ed., §2.3.1; from memory). */
const degC = (k: number) => k - 273.15;

/** The fixture as the charts endpoint shapes it: lines per mass fraction, °C. */
function duhringFromFixture(): ConsoleLiquorCharts['duhring'] {
  const byX = new Map<number, ConsoleLiquorCharts['duhring']['lines'][number]['points']>();
  // Reversed on purpose: the mapping must order lines and points itself.
  for (const p of [...boiling.points].reverse()) {
    const list = byX.get(p.massFraction) ?? [];
    list.push({
      waterBoilingPoint: degC(p.waterBoilingPoint),
      solutionBoilingPoint: degC(p.solutionBoilingPoint),
      pressure: p.pressure / 1000,
      extrapolated: false,
    });
    byX.set(p.massFraction, list);
  }
  return {
    description: 'IAPWS-08 seawater',
    lines: [...byX.entries()].map(([massFraction, points]) => ({ massFraction, points })),
  };
}

function enthalpyFromFixture(): ConsoleLiquorCharts['enthalpy'] {
  const byT = new Map<number, ConsoleLiquorCharts['enthalpy']['curves'][number]['points']>();
  for (const p of [...enthalpyFixture.points].reverse()) {
    const t = Math.round(degC(p.temperature) * 1000) / 1000;
    const list = byT.get(t) ?? [];
    list.push({ massFraction: p.massFraction, enthalpy: p.enthalpy / 1000, extrapolated: false });
    byT.set(t, list);
  }
  return {
    description: 'IAPWS-08 seawater at 101.325 kPa',
    curves: [...byT.entries()].map(([temperature, points]) => ({ temperature, points })),
  };
}

describe('Dühring chart data', () => {
  const duhring = duhringFromFixture();
  const concentrations = [...new Set(boiling.points.map((p) => p.massFraction))].sort((a, b) => a - b);

  it('draws one line per concentration of the IAPWS-08 table, in increasing mass fraction', () => {
    const sets = duhringDatasets(duhring);
    // Source: tests/fixtures/custom-liquor/seawater-boiling-points.json (IAPWS-08 via python3-iapws)
    expect(sets.map((s) => s.value)).toEqual(concentrations);
    expect(sets.map((s) => s.label)).toEqual(concentrations.map(massFractionLabel));
  });

  it('carries every IAPWS-08 boiling point through unchanged, in °C, water on x and solution on y', () => {
    const sets = duhringDatasets(duhring);
    for (const p of boiling.points) {
      const line = sets.find((s) => s.value === p.massFraction)!;
      const point = line.data.find((d) => Math.abs(d.x - degC(p.waterBoilingPoint)) < 1e-9);
      // Source: the same fixture; °C = K − 273.15 by definition (SI Brochure §2.3.1, from memory)
      expect(point).toBeDefined();
      expect(point!.y).toBeCloseTo(degC(p.solutionBoilingPoint), 9);
    }
    for (const s of sets) {
      const xs = s.data.map((d) => d.x);
      expect(xs).toEqual([...xs].sort((a, b) => a - b));
    }
  });

  it('stacks the lines as the published data do: at each pressure a saltier line lies higher', () => {
    // Common practice (and the IAPWS-08 fixture): the boiling-point rise grows with concentration,
    // so the Dühring lines do not cross. Checked at each water boiling point of the table.
    const sets = duhringDatasets(duhring);
    const waterPoints = [...new Set(boiling.points.map((p) => p.waterBoilingPoint))];
    for (const tw of waterPoints) {
      const ys = sets
        .map((s) => s.data.find((d) => Math.abs(d.x - degC(tw)) < 1e-9)?.y)
        .filter((y) => y !== undefined);
      expect(ys.length).toBeGreaterThan(1);
      expect(ys).toEqual([...ys].sort((a, b) => a! - b!));
    }
  });

  it('adds the pure-water reference y = x across the span of the data', () => {
    // Dühring's rule at x = 0: pure water boils at the water boiling point (a rise of zero) — common practice.
    const ref = duhringReference(duhring)!;
    const xs = boiling.points.map((p) => degC(p.waterBoilingPoint));
    expect(ref.data.map((d) => d.x)).toEqual([Math.min(...xs), Math.max(...xs)]);
    for (const d of ref.data) expect(d.y).toBe(d.x);
  });

  it('hands vue-chartjs one dataset per concentration plus the reference', async () => {
    const DuhringChart = (await import('../../console/src/components/charts/DuhringChart.vue')).default;
    // The chart places its legend by the screen width (Vuetify's display).
    mount(DuhringChart, { props: { duhring }, global: { plugins: [createVuetify()] } });
    // Source: IAPWS-08 fixture (concentrations), plus one reference line
    expect(seen.data?.datasets.length).toBe(concentrations.length + 1);
    expect(seen.data?.datasets.at(-1)?.label).toBe('water (no rise)');
  });
});

describe('enthalpy–concentration chart data', () => {
  const enthalpy = enthalpyFromFixture();
  const temperatures = [
    ...new Set(enthalpyFixture.points.map((p) => Math.round(degC(p.temperature) * 1000) / 1000)),
  ].sort((a, b) => a - b);

  it('draws one curve per temperature of the IAPWS-08 table, labelled in °C', () => {
    const sets = enthalpyDatasets(enthalpy);
    // Source: tests/fixtures/custom-liquor/seawater-enthalpy.json (IAPWS-08 via python3-iapws)
    expect(sets.map((s) => s.value)).toEqual(temperatures);
    expect(sets[0]!.label).toBe(`${temperatures[0]!.toFixed(0)} °C`);
  });

  it('plots mass fraction on x and kJ/kg on y, each value as IAPWS-08 gives it', () => {
    const sets = enthalpyDatasets(enthalpy);
    for (const p of enthalpyFixture.points) {
      const t = Math.round(degC(p.temperature) * 1000) / 1000;
      const point = sets.find((s) => s.value === t)!.data.find((d) => d.x === p.massFraction);
      // Source: the same fixture; 1 kJ = 1000 J (SI)
      expect(point!.y).toBeCloseTo(p.enthalpy / 1000, 9);
    }
    // Common practice: at fixed salinity a hotter curve lies higher (c_p > 0).
    const x = enthalpyFixture.points[0]!.massFraction;
    const ys = sets.map((s) => s.data.find((d) => d.x === x)?.y).filter((y) => y !== undefined);
    expect(ys).toEqual([...ys].sort((a, b) => a! - b!));
  });
});
