// @vitest-environment node
// The workbench builds its form from an operation's request schema (JSON Schema generated on the
// server from the zod contract), writes the body at the API's own field paths, places the API's
// messages beside those fields, plots sweeps and writes "Copy as" snippets. The schemas here are
// the real ones the console API serves (server/http/workbench.ts).
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import {
  axisValue,
  changingLeaves,
  formFields,
  getAt,
  leafFields,
  messagesByField,
  numericLeaves,
  parseEntry,
  parseValueList,
  quantityHint,
  setAt,
  sweepableFields,
  sweepSeries,
  sweepVary,
  typedUnit,
  unitAt,
  unitLabel,
  type JsonSchema,
  type QuantityField,
} from '../../console/src/composables/workbench-form.js';
import {
  curlSnippet,
  pythonSnippet,
  typescriptSnippet,
} from '../../console/src/composables/request-snippets.js';
import { workbenchOperations } from '../../server/http/workbench.js';

const operations = workbenchOperations();
const op = (id: string) => operations.find((o) => o.id === id)!;
const singleEffect = op('evaporators.single-effect');
const fields = formFields(singleEffect.body as JsonSchema);
const leaf = (p: string) => leafFields(fields).find((f) => f.path === p);

describe('form from the contract', () => {
  it('makes nested objects sections and quantities fields with their default unit and range', () => {
    expect(fields.find((f) => f.path === 'feed')).toMatchObject({ kind: 'section', required: true });
    expect(fields.find((f) => f.path === 'product')).toMatchObject({ kind: 'section', required: false });
    expect(leaf('feed.massFlow')).toMatchObject({
      kind: 'quantity',
      unit: 'kg/s',
      quantityKind: 'massFlow',
      label: 'Mass flow',
    });
    expect(leaf('body.pressure')).toMatchObject({ kind: 'quantity', unit: 'kPa', required: true });
    expect(leaf('heatLossFraction')).toMatchObject({ kind: 'quantity', required: false, min: 0, max: 0.5 });
    expect(quantityHint(leaf('heatLossFraction') as QuantityField)).toBe(
      'Number in a fraction 0–1, 0 to 0.5, or with a unit',
    );
  });

  it('marks optional fields, and turns booleans, enums and alternatives into their controls', () => {
    expect(leaf('figuresOfMerit')).toMatchObject({ kind: 'switch', required: false });
    // A liquor is an id or an inline definition: text in the form, the object in the JSON tab.
    expect(leaf('liquor')).toMatchObject({ kind: 'text', orObject: true, required: true });
    // U is a quantity or { estimate }: the quantity in the form.
    expect(leaf('body.overallHeatTransferCoefficient')).toMatchObject({ kind: 'quantity', orObject: true });
    const u = formFields(op('heat-transfer.overall-coefficient').body as JsonSchema);
    const type = leafFields(u).find((f) => f.path === 'evaporatorType');
    expect(type?.kind).toBe('choice');
    expect((type as { options: unknown[] }).options.length).toBeGreaterThan(1);
    // Lists (a train's U per effect) are edited as JSON.
    const train = formFields(op('evaporators.multiple-effect').body as JsonSchema);
    expect(leafFields(train).find((f) => f.path === 'overallHeatTransferCoefficients')?.kind).toBe('json');
  });

  it('offers every path-parameter operation its parameters as a form too', () => {
    const bpr = op('liquors.boiling-point');
    expect(leafFields(formFields(bpr.params as JsonSchema)).map((f) => f.path)).toEqual(['liquorId']);
  });

  it('offers the quantities and numbers for a sweep', () => {
    const paths = sweepableFields(fields).map((f) => f.path);
    expect(paths).toContain('body.pressure');
    expect(paths).not.toContain('liquor');
    expect(paths).not.toContain('figuresOfMerit');
  });
});

describe('entries and the body', () => {
  it('sends a plain number as a number and anything with a unit as typed', () => {
    expect(parseEntry('20')).toBe(20);
    expect(parseEntry(' 2.5e3 ')).toBe(2500);
    expect(parseEntry('2.')).toBe(2);
    expect(parseEntry('20 kPa')).toBe('20 kPa');
    expect(parseEntry('3 barg')).toBe('3 barg');
    expect(parseEntry('   ')).toBeUndefined();
  });

  it('writes at dotted paths without touching the original, and drops a section left empty', () => {
    const body = { feed: { massFlow: 1, temperature: 40 }, product: { massFraction: 0.3 } };
    const next = setAt(body, 'feed.massFlow', '4.5 t/h');
    expect(next.feed).toEqual({ massFlow: '4.5 t/h', temperature: 40 });
    expect(body.feed.massFlow).toBe(1);
    const cleared = setAt(next, 'product.massFraction', undefined);
    expect(cleared).not.toHaveProperty('product');
    expect(getAt(setAt({}, 'effects[1].area', 30), 'effects[1].area')).toBe(30);
    expect(getAt(body, 'feed.toString')).toBeUndefined();
  });

  it('refuses to write a prototype name', () => {
    expect(() => setAt({}, '__proto__.polluted', 1)).toThrow(/not a field name/);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
  });
});

describe('the API’s messages beside the fields', () => {
  it('puts a message on the field it names, inside a JSON box by prefix, and the rest apart', () => {
    const train = formFields(op('evaporators.multiple-effect').body as JsonSchema);
    const { byField, other } = messagesByField(train, [
      { field: 'feed.massFlow', message: 'is not a quantity' },
      { field: 'overallHeatTransferCoefficients[1]', message: 'must be above 1' },
      { field: 'somethingElse', message: 'unknown' },
    ]);
    expect(byField['feed.massFlow']).toEqual(['is not a quantity']);
    expect(byField.overallHeatTransferCoefficients).toEqual([
      'overallHeatTransferCoefficients[1]: must be above 1',
    ]);
    expect(other).toEqual([{ field: 'somethingElse', message: 'unknown' }]);
  });
});

describe('sweeps', () => {
  it('reads a list of values with units, and a range as numbers in the default unit', () => {
    expect(parseValueList('15, 20 kPa; 25\n0.3 bar')).toEqual([15, '20 kPa', 25, '0.3 bar']);
    expect(
      sweepVary({
        field: 'body.pressure',
        mode: 'range',
        list: '',
        from: '10',
        to: '40',
        steps: 4,
        log: true,
      }),
    ).toEqual({ field: 'body.pressure', from: 10, to: 40, steps: 4, spacing: 'log' });
    expect(
      sweepVary({
        field: 'body.pressure',
        mode: 'list',
        list: '10, 20 kPa',
        from: '',
        to: '',
        steps: 2,
        log: false,
      }),
    ).toEqual({ field: 'body.pressure', values: [10, '20 kPa'] });
  });

  it('plots the succeeding rows by the number of the varied value', () => {
    const rows = [
      {
        values: { 'body.pressure': 15 },
        status: 'ok' as const,
        result: { area: 40, steam: { massFlow: 1 } },
      },
      {
        values: { 'body.pressure': '20 kPa' },
        status: 'ok' as const,
        result: { area: 50, steam: { massFlow: 2 } },
      },
      { values: { 'body.pressure': 25 }, status: 'error' as const },
    ];
    expect(sweepSeries(rows, 'body.pressure', 'area')).toEqual([
      { x: 15, y: 40 },
      { x: 20, y: 50 },
    ]);
    expect(sweepSeries(rows, 'body.pressure', 'steam.massFlow')).toEqual([
      { x: 15, y: 1 },
      { x: 20, y: 2 },
    ]);
    expect(axisValue('3.5e1 kPa')).toBe(35);
    expect(axisValue('warm')).toBeNull();
    expect(typedUnit('20 kPa')).toBe('kPa');
    expect(typedUnit(20)).toBeUndefined();
  });

  it('puts first the results that change along the sweep', () => {
    const rows = [
      { values: { p: 15 }, status: 'ok' as const, result: { feed: { massFlow: 1.25 }, area: 40, duty: 9 } },
      { values: { p: 20 }, status: 'ok' as const, result: { feed: { massFlow: 1.25 }, area: 50, duty: 9 } },
      { values: { p: 25 }, status: 'error' as const },
    ];
    expect(changingLeaves(rows)).toEqual(['area']);
  });

  it('charts every number of a result but its provenance, warnings and cautions', () => {
    const result = {
      area: 40,
      mode: 'design',
      steam: { massFlow: 1.2 },
      effects: [{ temperature: 60 }],
      warnings: [{ code: 'x', message: 'y', validRange: { min: 1, max: 2 } }],
      provenance: { engineVersion: '1', models: [] },
    };
    expect(numericLeaves(result)).toEqual(['area', 'steam.massFlow', 'effects[0].temperature']);
  });

  it('finds the unit of an answer’s number in the response schema', () => {
    const response = singleEffect.response as JsonSchema;
    expect(unitAt(response, 'area')).toBe('m2');
    expect(unitLabel(unitAt(response, 'area'))).toBe('m²');
    expect(unitLabel(unitAt(response, 'waterBoilingPoint'))).toBe('°C');
    expect(unitAt(response, 'steam.massFlow')).toBe('kg/s');
    expect(unitAt(response, 'nothing.here')).toBeUndefined();
  });
});

describe('copy as', () => {
  const origin = 'https://ebullio.example';
  const request = {
    method: 'POST',
    path: '/v1/liquors/sodium-hydroxide/boiling-point',
    body: { massFraction: 0.3, pressure: "150 mbar it's", flag: true, none: null },
  };
  const template = {
    template: '/v1/liquors/{liquorId}/boiling-point',
    params: { liquorId: 'sodium-hydroxide' },
  };

  it('writes curl with the key as $EBULLIO_API_KEY and the body in a quoted here-document', () => {
    const text = curlSnippet(origin, request);
    expect(text).toContain(
      `curl -sS -X POST 'https://ebullio.example/v1/liquors/sodium-hydroxide/boiling-point'`,
    );
    expect(text).toContain('-H "Authorization: Bearer $EBULLIO_API_KEY"');
    expect(text).toContain("--data-binary @- <<'JSON'");
    expect(text.trimEnd().endsWith('\nJSON')).toBe(true);
    expect(JSON.parse(text.slice(text.indexOf('{'), text.lastIndexOf('}') + 1))).toEqual(request.body);
  });

  it('writes TypeScript with the generated client and the path parameters apart', () => {
    const text = typescriptSnippet(origin, request, template);
    expect(text).toContain("import { createEbullioClient } from './openapi/client/index.js';");
    expect(text).toContain('const apiKey = process.env.EBULLIO_API_KEY;');
    expect(text).toContain("createEbullioClient({ baseUrl: 'https://ebullio.example', apiKey });");
    expect(text).toContain("await ebullio.POST('/v1/liquors/{liquorId}/boiling-point', {");
    expect(text).toContain("params: { path: {\n    liquorId: 'sodium-hydroxide',");
    expect(text).toContain("pressure: '150 mbar it\\'s',");
  });

  it('writes Python with urllib that Python itself parses, the body as Python literals', () => {
    const text = pythonSnippet(origin, request);
    expect(text).toContain('os.environ["EBULLIO_API_KEY"]');
    expect(text).toContain('"flag": True,');
    expect(text).toContain('"none": None,');
    // Debian's Python 3 checks the syntax without running the call.
    const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'wb-py-')), 'call.py');
    fs.writeFileSync(file, text);
    execFileSync('/usr/bin/python3', ['-c', 'import ast,sys; ast.parse(open(sys.argv[1]).read())', file]);
  });
});
