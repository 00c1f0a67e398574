/**
 * Icons ship as SVG paths for the names the console uses (console/src/plugins/icons.ts), not as
 * the whole icon font: every `mdi-…` name written in console/src must have its path, and an icon
 * renders as an inline <svg> with that path. Expected paths are @mdi/js's own exports.
 */
import fs from 'node:fs';
import path from 'node:path';
import { mount } from '@vue/test-utils';
import { mdiKeyVariant } from '@mdi/js';
import { describe, expect, it } from 'vitest';
import { VIcon } from 'vuetify/components';
import { iconPaths } from '../../console/src/plugins/icons.js';
import { createEbullioVuetify } from '../../console/src/plugins/vuetify.js';

const SOURCE = path.resolve(import.meta.dirname, '../../console/src');

function sourceFiles(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const full = path.join(dir, e.name);
    if (e.isDirectory()) return sourceFiles(full);
    return /\.(vue|ts)$/.test(e.name) && !full.endsWith(path.join('plugins', 'icons.ts')) ? [full] : [];
  });
}

describe('console icons', () => {
  it('has a path for every icon name the console source uses', () => {
    const used = new Set<string>();
    for (const file of sourceFiles(SOURCE)) {
      for (const m of fs.readFileSync(file, 'utf8').matchAll(/(?<!iconsets\/)\bmdi-[a-z0-9-]+/g))
        used.add(m[0]);
    }
    expect(used.size).toBeGreaterThan(0);
    const missing = [...used].filter((name) => !(name in iconPaths));
    expect(missing).toEqual([]);
  });

  it('renders a named icon as an inline SVG path, and Vuetify’s own aliases too', () => {
    const vuetify = createEbullioVuetify();
    const named = mount(VIcon, { props: { icon: 'mdi-key-variant' }, global: { plugins: [vuetify] } });
    expect(named.find('svg path').attributes('d')).toBe(mdiKeyVariant);
    const alias = mount(VIcon, { props: { icon: '$close' }, global: { plugins: [vuetify] } });
    expect(alias.find('svg path').attributes('d')).toMatch(/^M/);
  });
});
