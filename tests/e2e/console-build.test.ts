// The browser tests and the bundle benchmark test the console as `npm start` ships it: a
// production build, even though vitest runs with NODE_ENV=test (Vite keeps an existing NODE_ENV
// and would otherwise ship Vue's development code). Vue's development build prints its warnings
// with the prefix "[Vue warn]"; the production build has none (common practice: Vue strips
// __DEV__ branches in production builds).
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ensureConsoleBuilt, ROOT } from './harness.js';

describe('the console build the browser tests use', () => {
  it('is a production build with no development-only code', () => {
    expect(process.env.NODE_ENV).toBe('test');
    ensureConsoleBuilt();
    const assets = path.join(ROOT, 'console', 'dist', 'assets');
    const scripts = fs.readdirSync(assets).filter((f) => f.endsWith('.js'));
    expect(scripts.length).toBeGreaterThan(0);
    for (const file of scripts) {
      expect(fs.readFileSync(path.join(assets, file), 'utf8'), file).not.toContain('[Vue warn]');
    }
  });
});
