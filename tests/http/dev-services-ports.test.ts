// The development services take free ports by default, so two servers can run on one machine:
// the local fake of the payment provider listens on PAYMENTS_API_BASE's port, and with the
// default (port 0) on any free one, and main.ts points the payments client at the port bound.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { DEV_API_KEY, loadPaymentsConfig, withBoundPort } from '../../server/integrations/payments/config.js';
import { startServerProcess, type ServerProcess } from '../support/server-process.js';

const started: ServerProcess[] = [];
afterAll(async () => {
  for (const s of started) {
    s.child.kill('SIGTERM');
    await s.exited;
  }
});

function fakeUrlOf(output: string): string | undefined {
  return /development fake payment provider on (http:\/\/127\.0\.0\.1:\d+)/.exec(output)?.[1];
}

describe('local payment provider port', () => {
  it('defaults to any free loopback port and keeps a port PAYMENTS_API_BASE names', () => {
    expect(loadPaymentsConfig({}).apiBase?.href).toBe('http://127.0.0.1:0/');
    expect(loadPaymentsConfig({ PAYMENTS_API_BASE: 'http://127.0.0.1:4599' }).apiBase?.port).toBe('4599');
    const bound = withBoundPort(loadPaymentsConfig({}), 40123);
    expect(bound.apiBase?.href).toBe('http://127.0.0.1:40123/');
    expect(withBoundPort(loadPaymentsConfig({ PAYMENTS_API_BASE: '' }), 40123).apiBase).toBeUndefined();
  });

  it('starts two servers with the default settings on one machine, each with its own fake provider', async () => {
    const servers = [0, 1].map(() => {
      const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ebullio-ports-'));
      const s = startServerProcess({
        PORT: '0',
        DB_FILE: path.join(dir, 'e.db'),
        PAYMENTS_API_BASE: 'http://127.0.0.1:0', // the default, stated in case the shell sets one
        PAYMENTS_API_KEY: '',
        PAYMENTS_WEBHOOK_SECRET: '',
        FAKE_PAYMENTS: '',
        MAIL_CAPTURE_PORT: '',
        NODE_ENV: 'development',
      });
      started.push(s);
      return s;
    });
    const ports = await Promise.all(servers.map((s) => s.port));
    expect(ports[0]).not.toBe(ports[1]);
    const fakes = servers.map((s) => fakeUrlOf(s.output()));
    for (const [i, url] of fakes.entries()) {
      expect(url, servers[i]!.output()).toBeDefined();
      expect(servers[i]!.output()).not.toMatch(/EADDRINUSE|not started/);
    }
    expect(fakes[0]).not.toBe(fakes[1]);
    // Each fake answers with the default development key (an unknown invoice: the fake's 404).
    for (const url of fakes) {
      const res = await fetch(`${url}/v1/invoices/inv-missing`, {
        headers: { Authorization: `Bearer ${DEV_API_KEY}` },
      });
      expect(res.status).toBe(404);
    }
  }, 60_000);
});
