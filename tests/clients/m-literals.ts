// A reader for the literals of the Power Query formula language (M) that the spreadsheet recipe
// (openapi/examples/power-query/cases.pq) keeps its request in: text ("…", "" for a quote and the
// #(lf), #(cr), #(tab), #(#) and #(XXXX) escapes), numbers, true/false/null, lists {…}, records
// […] with plain or #"quoted" field names, and #table({columns}, {{row}, …}). Comments (// and
// /* */) may stand between tokens. Anything else (an operator, a function call) is refused, so a
// binding the tests read cannot silently become an expression.

export type MValue = string | number | boolean | null | MValue[] | MRecord | MTable;
export interface MRecord {
  [field: string]: MValue;
}
export interface MTable {
  kind: 'table';
  columns: string[];
  rows: MValue[][];
}

export function isTable(v: MValue): v is MTable {
  return (
    typeof v === 'object' && v !== null && !Array.isArray(v) && (v as { kind?: unknown }).kind === 'table'
  );
}

class Reader {
  pos = 0;
  constructor(private readonly text: string) {}

  fail(what: string): never {
    const line = this.text.slice(0, this.pos).split('\n').length;
    throw new SyntaxError(
      `M literal, line ${line}: ${what} at ${JSON.stringify(this.text.slice(this.pos, this.pos + 30))}`,
    );
  }

  skip(): void {
    for (;;) {
      const rest = this.text.slice(this.pos);
      const m = /^(?:\s+|\/\/[^\n]*|\/\*[\s\S]*?\*\/)/.exec(rest);
      if (!m) return;
      this.pos += m[0].length;
    }
  }

  expect(token: string): void {
    this.skip();
    if (!this.text.startsWith(token, this.pos)) this.fail(`expected ${token}`);
    this.pos += token.length;
  }

  peek(token: string): boolean {
    this.skip();
    return this.text.startsWith(token, this.pos);
  }

  value(): MValue {
    this.skip();
    const c = this.text[this.pos];
    if (c === '"') return this.textLiteral();
    if (c === '{') return this.list();
    if (c === '[') return this.record();
    if (this.text.startsWith('#table', this.pos)) return this.table();
    const word = /^(true|false|null)\b/.exec(this.text.slice(this.pos));
    if (word) {
      this.pos += word[0].length;
      return word[1] === 'null' ? null : word[1] === 'true';
    }
    const num = /^-?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?/.exec(this.text.slice(this.pos));
    if (num) {
      this.pos += num[0].length;
      return Number(num[0]);
    }
    return this.fail('not a literal');
  }

  textLiteral(): string {
    this.expect('"');
    let out = '';
    for (;;) {
      const c = this.text[this.pos];
      if (c === undefined) this.fail('unterminated text');
      if (c === '"') {
        if (this.text[this.pos + 1] === '"') {
          out += '"';
          this.pos += 2;
          continue;
        }
        this.pos += 1;
        return out;
      }
      if (c === '#' && this.text[this.pos + 1] === '(') {
        const m = /^#\(([^)]*)\)/.exec(this.text.slice(this.pos));
        if (!m) this.fail('bad escape');
        out += m[1]!
          .split(',')
          .map((e) => escapeChar(e.trim(), () => this.fail(`unknown escape #(${e})`)))
          .join('');
        this.pos += m[0].length;
        continue;
      }
      out += c;
      this.pos += 1;
    }
  }

  list(): MValue[] {
    this.expect('{');
    const items: MValue[] = [];
    if (this.peek('}')) {
      this.pos += 1;
      return items;
    }
    for (;;) {
      items.push(this.value());
      if (this.peek(',')) {
        this.pos += 1;
        continue;
      }
      this.expect('}');
      return items;
    }
  }

  fieldName(): string {
    this.skip();
    if (this.text.startsWith('#"', this.pos)) {
      this.pos += 1;
      return this.textLiteral();
    }
    const m = /^[A-Za-z_][A-Za-z0-9_.]*/.exec(this.text.slice(this.pos));
    if (!m) this.fail('expected a field name');
    this.pos += m[0].length;
    return m[0];
  }

  record(): MRecord {
    this.expect('[');
    const rec: MRecord = {};
    if (this.peek(']')) {
      this.pos += 1;
      return rec;
    }
    for (;;) {
      const name = this.fieldName();
      if (Object.hasOwn(rec, name)) this.fail(`field ${name} twice`);
      if (name === '__proto__' || name === 'constructor' || name === 'prototype') this.fail(`field ${name}`);
      this.expect('=');
      rec[name] = this.value();
      if (this.peek(',')) {
        this.pos += 1;
        continue;
      }
      this.expect(']');
      return rec;
    }
  }

  table(): MTable {
    this.expect('#table');
    this.expect('(');
    const columns = this.list();
    this.expect(',');
    const rows = this.list();
    this.expect(')');
    if (!columns.every((c) => typeof c === 'string')) this.fail('#table columns must be text');
    for (const row of rows) {
      if (!Array.isArray(row) || row.length !== columns.length) this.fail('#table row of the wrong length');
    }
    return { kind: 'table', columns: columns as string[], rows: rows as MValue[][] };
  }
}

function escapeChar(name: string, fail: () => never): string {
  const named: Record<string, string> = { lf: '\n', cr: '\r', tab: '\t', '#': '#' };
  if (named[name] !== undefined) return named[name];
  if (/^[0-9A-Fa-f]{4}$/.test(name) || /^[0-9A-Fa-f]{8}$/.test(name)) {
    return String.fromCodePoint(parseInt(name, 16));
  }
  return fail();
}

/** One literal from the start of `text` (what follows it is not read). */
export function readMLiteral(text: string): MValue {
  return new Reader(text).value();
}

/**
 * The literal bound to `name` in a `let` of the script: the first line that starts (after
 * indentation) with `name =`. The bound value must be a literal, followed by `,` or `in`.
 */
export function readMBinding(script: string, name: string): MValue {
  const m = new RegExp(`^[ \\t]*${name.replace(/[^A-Za-z0-9_]/g, '')}[ \\t]*=(?!=)`, 'm').exec(script);
  if (!m) throw new Error(`no binding ${name} in the script`);
  const reader = new Reader(script);
  reader.pos = m.index + m[0].length;
  const value = reader.value();
  reader.skip();
  if (!(script.startsWith(',', reader.pos) || /^in\b/.test(script.slice(reader.pos)))) {
    reader.fail(`${name} is not a literal alone`);
  }
  return value;
}
