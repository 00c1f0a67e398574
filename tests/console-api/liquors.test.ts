// Console liquor library: built-in and stored liquors with validity boxes, chart data computed by
// the engine (shape, monotonicity, no NaN, chart readings), CSV Dühring upload with line errors.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { builtInLiquors } from '../../server/engine/liquors/registry.js';
import type { ConsoleLiquor, ConsoleLiquorCharts } from '../../shared/console/liquors.js';
import naoh from '../fixtures/custom-liquor/naoh-duhring-table.json' with { type: 'json' };
import { makeConsoleHarness, type ConsoleHarness } from './data-harness.js';

let h: ConsoleHarness;
beforeAll(async () => {
  h = await makeConsoleHarness();
});
afterAll(async () => {
  await h.close();
});

type Line = ConsoleLiquorCharts['duhring']['lines'][number];
type Curve = ConsoleLiquorCharts['enthalpy']['curves'][number];

/** Linear interpolation of y(x) through sorted points (a chart read between grid lines). */
function interpolate(points: { x: number; y: number }[], x: number): number {
  for (let i = 1; i < points.length; i++) {
    const a = points[i - 1]!;
    const b = points[i]!;
    if (x >= a.x && x <= b.x) return a.y + ((b.y - a.y) * (x - a.x)) / (b.x - a.x);
  }
  throw new Error(`x = ${x} outside the points`);
}

const charts = async (id: string, query = '') =>
  (await h.admin.agent.get(`/console-api/liquors/${id}/charts${query}`).expect(200))
    .body as ConsoleLiquorCharts;

/** The fixture (kelvin) as the CSV a user would upload (°C = K − 273.15, exact by definition). */
function fixtureCsv(): string {
  const rows = ['massFraction,waterBoilingPoint,solutionBoilingPoint'];
  for (const line of naoh.duhring) {
    for (const p of line.points) {
      rows.push(
        `${line.massFraction},${(p.waterBoilingPoint - 273.15).toFixed(4)},${(p.solutionBoilingPoint - 273.15).toFixed(4)}`,
      );
    }
  }
  return rows.join('\n') + '\n';
}

describe('GET /console-api/liquors', () => {
  it('lists every built-in model with its validity box in °C and its sources', async () => {
    const res = await h.billing.agent.get('/console-api/liquors').expect(200);
    const ids = (res.body.items as { id: string }[]).map((l) => l.id);
    expect(ids).toEqual([...builtInLiquors.keys()]);
    const caustic = (res.body.items as ConsoleLiquor[]).find((l) => l.id === 'sodium-hydroxide')!;
    // Olsson et al. (1997) data reach 204 °C for the enthalpy (model documentation).
    expect(caustic.validity.temperature).toEqual({ min: 0, max: 204 });
    expect(caustic).toMatchObject({ kind: 'built-in', accountId: null });
    expect(caustic.sources.map((s) => s.key)).toContain('olsson-1997');
    expect(caustic.cautions.length).toBeGreaterThan(0);
  });

  it('is not open to developers', async () => {
    await h.developer.agent.get('/console-api/liquors').expect(403);
  });
});

describe('GET /console-api/liquors/:id/charts for the built-in models', () => {
  it('sends only finite numbers, every Dühring line rising with the water boiling point', async () => {
    for (const id of builtInLiquors.keys()) {
      const c = await charts(id);
      // JSON turns NaN and ±Infinity into null: no null may appear in the chart data.
      expect(JSON.stringify([c.duhring, c.enthalpy])).not.toMatch(/null|NaN|Infinity/);
      expect(c.duhring.lines.length).toBeGreaterThanOrEqual(3);
      for (const line of c.duhring.lines) {
        expect(line.points.length).toBeGreaterThanOrEqual(2);
        for (let i = 1; i < line.points.length; i++) {
          // Dühring's rule (common practice): the solution boils higher as the pressure rises.
          expect(line.points[i]!.waterBoilingPoint).toBeGreaterThan(line.points[i - 1]!.waterBoilingPoint);
          expect(line.points[i]!.solutionBoilingPoint).toBeGreaterThan(
            line.points[i - 1]!.solutionBoilingPoint,
          );
        }
      }
    }
  });

  it('puts a richer liquor above a leaner one at the same water boiling point', async () => {
    for (const id of builtInLiquors.keys()) {
      const lines = (await charts(id)).duhring.lines;
      for (let j = 1; j < lines.length; j++) {
        for (const p of lines[j]!.points) {
          const lean = lines[j - 1]!.points.find((q) => q.waterBoilingPoint === p.waterBoilingPoint);
          // Boiling-point elevation grows with solute content (common practice; Raoult's law in the dilute limit).
          if (lean)
            expect(
              p.solutionBoilingPoint,
              `${id} x=${lines[j]!.massFraction} tw=${p.waterBoilingPoint}`,
            ).toBeGreaterThan(lean.solutionBoilingPoint);
        }
      }
    }
  });

  it('draws the pure-water line (x = 0) on the diagonal within 0.2 K', async () => {
    const line = (await charts('sodium-hydroxide')).duhring.lines.find((l) => l.massFraction === 0)!;
    // x = 0 is pure water: its boiling point is the water boiling point by definition; the
    // Olsson fit sits 0.04–0.14 K below IF97 (model documentation), hence 0.2 K.
    for (const p of line.points)
      expect(Math.abs(p.solutionBoilingPoint - p.waterBoilingPoint)).toBeLessThan(0.2);
  });

  it('reproduces the textbook Dühring-chart reading for 50 % NaOH', async () => {
    const line = (await charts('sodium-hydroxide')).duhring.lines.find((l) => l.massFraction === 0.5)!;
    const pts = line.points.map((p) => ({ x: p.waterBoilingPoint, y: p.solutionBoilingPoint }));
    // Geankoplis, Transport Processes and Separation Process Principles, Example 8.4-3 (from
    // memory): water boils at 48.9 °C at 11.7 kPa and 50 % NaOH at 89.5 °C. Tolerance ±2 K for
    // a chart reading plus the straight-line read between our grid points (Dühring's rule).
    expect(interpolate(pts, 48.9)).toBeGreaterThan(89.5 - 2);
    expect(interpolate(pts, 48.9)).toBeLessThan(89.5 + 2);
    // McCabe, Smith and Harriott, Example 16.1 (from memory): water at 124 °F (51.1 °C), 50 %
    // NaOH at 197 °F (91.7 °C). Tolerance ±2.5 K.
    expect(Math.abs(interpolate(pts, (124 - 32) / 1.8) - (197 - 32) / 1.8)).toBeLessThan(2.5);
  });

  it('gives enthalpy–concentration curves that match textbook chart readings for NaOH', async () => {
    const curves = (await charts('sodium-hydroxide')).enthalpy.curves;
    const at = (x: number, tC: number) => {
      const byT = curves.map((c: Curve) => ({
        x: c.temperature,
        y: c.points.find((p) => p.massFraction === x)!.enthalpy,
      }));
      return interpolate(byT, tC);
    };
    // Geankoplis Example 8.4-3 (from memory): 20 % NaOH at 60 °C, 214 kJ/kg; 50 % at 89.5 °C,
    // 505 kJ/kg, read from the enthalpy–concentration chart. Tolerance ±5 kJ/kg (chart reading).
    expect(Math.abs(at(0.2, 60) - 214)).toBeLessThan(5);
    expect(Math.abs(at(0.5, 89.5) - 505)).toBeLessThan(5);
    // Hotter solution, higher enthalpy at every concentration (cp > 0, common practice).
    for (let i = 1; i < curves.length; i++) {
      for (const p of curves[i]!.points) {
        const colder = curves[i - 1]!.points.find((q) => q.massFraction === p.massFraction);
        if (colder) expect(p.enthalpy).toBeGreaterThan(colder.enthalpy);
      }
    }
  });

  it('leaves out points beyond the model’s hard limits instead of sending NaN', async () => {
    const c = await charts('sodium-hydroxide');
    // 80 % NaOH boils above 250 °C (the model's hard limit) long before water reaches 200 °C.
    const rich = c.duhring.lines.find((l: Line) => l.massFraction === 0.8)!;
    const lean = c.duhring.lines.find((l: Line) => l.massFraction === 0)!;
    expect(rich.points.length).toBeLessThan(lean.points.length);
    expect(c.omittedPoints).toBeGreaterThan(0);
    for (const p of rich.points) expect(p.solutionBoilingPoint).toBeLessThanOrEqual(250);
  });

  it('charts the black liquor on to its 85 % limit, flagging every point beyond 50 % dry solids as extrapolated', async () => {
    const c = await charts('kraft-black-liquor');
    const fractions = c.duhring.lines.map((l: Line) => l.massFraction);
    // Model documentation (server/engine/liquors/kraft-black-liquor.ts): BPR silent to 50 % dry
    // solids, "model-extrapolated" from 50 % to 85 %, refused beyond; the pressure correction is
    // trusted for water boiling at 50–150 °C and the liquor itself at 40–150 °C (extrapolated
    // outside those at any solids).
    expect(Math.max(...fractions)).toBe(0.85);
    expect(fractions).toContain(0.5);
    for (const line of c.duhring.lines)
      for (const p of line.points) {
        const where = `x=${line.massFraction} tw=${p.waterBoilingPoint}`;
        if (line.massFraction > 0.5) expect(p.extrapolated, where).toBe(true);
        else if (p.waterBoilingPoint >= 50 && p.solutionBoilingPoint <= 150)
          expect(p.extrapolated, where).toBe(false);
      }
  });

  it('answers 404 for an unknown liquor', async () => {
    await h.admin.agent.get('/console-api/liquors/no-such-liquor/charts').expect(404);
    await h.admin.agent.get(`/console-api/liquors/no-such-liquor/charts?accountId=${h.alphaId}`).expect(404);
  });
});

/** c_p(x) = 4.18 − 2.4·x kJ/(kg·K): the example of the upload contract (shared/contracts/liquors.ts). */
const HEAT_CAPACITY = '4.18,-2.4';

describe('POST /console-api/accounts/:id/liquors (CSV Dühring upload)', () => {
  it('refuses an upload without a heat capacity with a 422 naming heatCapacity', async () => {
    const res = await h.admin.agent
      .post(`/console-api/accounts/${h.alphaId}/liquors`)
      .set('X-CSRF-Token', h.admin.csrf)
      .field('name', 'No heat capacity')
      .attach('file', Buffer.from(fixtureCsv()), { filename: 'duhring.csv', contentType: 'text/csv' })
      .expect(422);
    expect((res.body.errors as { field: string }[]).map((e) => e.field)).toContain('heatCapacity');
  });

  it('describes a stored 40–100 °C table by its own temperature range in °C, not the 0–350 °C liquid range', async () => {
    // Invented readings: two concentrations, water boiling at 40 and 100 °C.
    const csv =
      'massFraction,waterBoilingPoint,solutionBoilingPoint\n0.1,40,42\n0.1,100,103\n0.3,40,48\n0.3,100,110\n';
    const res = await h.admin.agent
      .post(`/console-api/accounts/${h.betaId}/liquors`)
      .set('X-CSRF-Token', h.admin.csrf)
      .field('name', 'Forty to hundred')
      .field('heatCapacity', HEAT_CAPACITY)
      .attach('file', Buffer.from(csv), { filename: 't.csv', contentType: 'text/csv' })
      .expect(201);
    expect(res.body.validity.temperature).toEqual({ min: 40, max: 110 });
    const notes = (res.body.validity.notes as string[]).join(' ');
    expect(notes).toContain('water boiling points 40–100 °C');
    expect(notes).not.toMatch(/\d K overall|313\.15|373\.15/);
    const list = await h.admin.agent.get(`/console-api/liquors?accountId=${h.betaId}`).expect(200);
    const item = (list.body.items as { id: string; validity: { temperature: unknown } }[]).find(
      (l) => l.id === 'forty-to-hundred',
    );
    expect(item?.validity.temperature).toEqual({ min: 40, max: 110 });
  });

  it('stores the table for the account, lists it and charts it through the table readings', async () => {
    const res = await h.admin.agent
      .post(`/console-api/accounts/${h.alphaId}/liquors`)
      .set('X-CSRF-Token', h.admin.csrf)
      .field('name', 'Plant caustic (Olsson table)')
      .field('heatCapacity', HEAT_CAPACITY)
      .attach('file', Buffer.from(fixtureCsv()), { filename: 'duhring.csv', contentType: 'text/csv' })
      .expect(201);
    expect(res.body).toMatchObject({
      id: 'plant-caustic-olsson-table',
      kind: 'stored',
      accountId: h.alphaId,
      accountName: 'Invented Alpha Works',
    });
    expect(
      (await h.deps.store.db.select().from(h.deps.store.t.auditLog)).some(
        (a) => a.action === 'liquor.upload',
      ),
    ).toBe(true);

    const list = await h.admin.agent.get(`/console-api/liquors?accountId=${h.alphaId}`).expect(200);
    expect((list.body.items as { id: string }[]).map((l) => l.id)).toContain('plant-caustic-olsson-table');
    const other = await h.admin.agent.get(`/console-api/liquors?accountId=${h.betaId}`).expect(200);
    expect((other.body.items as { id: string }[]).map((l) => l.id)).not.toContain(
      'plant-caustic-olsson-table',
    );

    const c = await charts('plant-caustic-olsson-table', `?accountId=${h.alphaId}`);
    expect(JSON.stringify([c.duhring, c.enthalpy])).not.toMatch(/null|NaN|Infinity/);
    // The fixture (Olsson et al. 1997 equation; IF97 water boiling points from python3-iapws,
    // tests/fixtures/custom-liquor/naoh-duhring-table.py): read each chart line at the table's
    // own water boiling points; a Dühring line is straight (Dühring's rule), so within 0.5 K.
    for (const table of naoh.duhring) {
      const line = c.duhring.lines.find((l) => Math.abs(l.massFraction - table.massFraction) < 1e-9);
      if (!line) continue;
      const pts = line.points.map((p) => ({ x: p.waterBoilingPoint, y: p.solutionBoilingPoint }));
      for (const p of table.points) {
        const tw = p.waterBoilingPoint - 273.15;
        if (tw < pts[0]!.x || tw > pts.at(-1)!.x) continue;
        expect(Math.abs(interpolate(pts, tw) - (p.solutionBoilingPoint - 273.15))).toBeLessThan(0.5);
      }
    }
  });

  it('names every bad CSV cell by its line and column', async () => {
    const csv = 'massFraction,waterBoilingPoint,solutionBoilingPoint\n0.1,45.8,47.7\n0.1,abc,70\n1.2,45,50\n';
    const res = await h.admin.agent
      .post(`/console-api/accounts/${h.alphaId}/liquors`)
      .set('X-CSRF-Token', h.admin.csrf)
      .field('name', 'Broken table')
      .field('heatCapacity', HEAT_CAPACITY)
      .attach('file', Buffer.from(csv), { filename: 'broken.csv', contentType: 'text/csv' })
      .expect(422);
    expect((res.body.errors as { field: string }[]).map((e) => e.field)).toEqual([
      'line 3, column waterBoilingPoint',
      'line 4, column massFraction',
    ]);
  });

  it('refuses a taken id (409), a JSON body (415), billing users (403) and an unknown account (404)', async () => {
    const send = (who = h.admin, account = h.alphaId) =>
      who.agent
        .post(`/console-api/accounts/${account}/liquors`)
        .set('X-CSRF-Token', who.csrf)
        .field('name', 'Plant caustic (Olsson table)')
        .field('heatCapacity', HEAT_CAPACITY)
        .attach('file', Buffer.from(fixtureCsv()), { filename: 'duhring.csv', contentType: 'text/csv' });
    expect((await send()).status).toBe(409);
    expect((await send(h.billing)).status).toBe(403);
    expect((await send(h.admin, 9999)).status).toBe(404);
    await h.admin.agent
      .post(`/console-api/accounts/${h.alphaId}/liquors`)
      .set('X-CSRF-Token', h.admin.csrf)
      .send({ name: 'x' })
      .expect(415);
  });
});
