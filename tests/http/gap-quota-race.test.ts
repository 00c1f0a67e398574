// Quota under concurrency: two requests of one account whose bodies arrive interleaved must not
// both pass a quota that covers only one of them. The quota is checked when the units are charged
// (after the body is read), against the units committed so far plus those charged by the
// account's other requests still in flight, not against a figure read when the request arrived.
import net from 'node:net';
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { afterEach, describe, expect, it } from 'vitest';
import { requireOperation } from '../../server/http/middleware/operation.js';
import { v1RouteModules } from '../../server/http/v1/index.js';
import type { V1RouteModule } from '../../server/http/v1/module.js';
import { makeHarness, usageRows, type Harness } from './helpers.js';

/** POST /v1/__race/hold: charged 5 units (as evaporators.multiple-effect), answers once released. */
let release: () => void = () => undefined;
let holding: Promise<void> = Promise.resolve();
const holdModule: V1RouteModule = {
  register(router) {
    router.post('/__race/hold', requireOperation('evaporators.multiple-effect'), async (_req, res) => {
      const gate = new Promise<void>((resolve) => (release = resolve));
      announceHolding();
      await gate;
      res.json({ ok: true });
    });
  },
};
let announceHolding: () => void = () => undefined;
holding = new Promise<void>((resolve) => (announceHolding = resolve));
if (!v1RouteModules.includes(holdModule)) v1RouteModules.push(holdModule);

let server: Server | undefined;
afterEach(async () => {
  release();
  server?.closeAllConnections();
  await new Promise<void>((resolve) => (server ? server.close(() => resolve()) : resolve()));
  server = undefined;
});

function listen(h: Harness): Promise<number> {
  return new Promise((resolve) => {
    server = h.app.listen(0, '127.0.0.1', () => resolve((server!.address() as AddressInfo).port));
  });
}

/** Opens a raw HTTP/1.1 request whose body is sent in two parts; `finish()` sends the rest. */
async function slowRequest(port: number, path: string, token: string, id: string) {
  const body = JSON.stringify({ note: 'the second half of this body arrives late' });
  const socket = net.connect(port, '127.0.0.1');
  await new Promise<void>((resolve) => socket.once('connect', () => resolve()));
  let response = '';
  socket.on('data', (d) => (response += d.toString()));
  const closed = new Promise<void>((resolve) => socket.on('close', () => resolve()));
  socket.write(
    `POST ${path} HTTP/1.1\r\nHost: localhost\r\nAuthorization: Bearer ${token}\r\nConnection: close\r\n` +
      `X-Request-Id: ${id}\r\nContent-Type: application/json\r\nContent-Length: ${body.length}\r\n\r\n` +
      body.slice(0, 10),
  );
  await new Promise((r) => setTimeout(r, 100)); // the server has the headers and part of the body
  return {
    async finish(): Promise<string> {
      socket.write(body.slice(10));
      await closed;
      return response;
    },
  };
}

describe('monthly quota with concurrent requests', () => {
  it('refuses the second of two interleaved requests when the quota covers only one, and bills one', async () => {
    // The test route costs 5 units (it is guarded as evaporators.multiple-effect, see helpers.ts).
    const h = await makeHarness({ quota: 5 });
    const port = await listen(h);
    const slow = await slowRequest(port, '/v1/__test/charge', h.token, 'race-slow');
    const fast = await fetch(`http://127.0.0.1:${port}/v1/__test/charge`, {
      method: 'POST',
      headers: {
        authorization: `Bearer ${h.token}`,
        'content-type': 'application/json',
        'x-request-id': 'race-fast',
      },
      body: '{}',
    });
    expect(fast.status).toBe(200);
    const raw = await slow.finish();
    expect(raw).toMatch(/^HTTP\/1\.1 429 /);
    expect(raw).toMatch(/content-type: application\/problem\+json/i);
    expect(raw).toContain('"type":"/problems/quota-exceeded"');
    const billed = (await usageRows(h.store)).reduce((sum, r) => sum + r.units, 0);
    expect(billed).toBe(5);
  });

  it('counts the units of a request still in flight (charged, not yet answered) against the next one', async () => {
    const h = await makeHarness({ quota: 9 });
    const port = await listen(h);
    const held = fetch(`http://127.0.0.1:${port}/v1/__race/hold`, {
      method: 'POST',
      headers: { authorization: `Bearer ${h.token}` },
    });
    await holding; // the held request has been charged 5 units and waits
    const second = await fetch(`http://127.0.0.1:${port}/v1/__test/charge`, {
      method: 'POST',
      headers: { authorization: `Bearer ${h.token}`, 'content-type': 'application/json' },
      body: '{}',
    });
    expect(second.status).toBe(429); // 5 in flight + 5 > 9
    expect((await second.json()).type).toBe('/problems/quota-exceeded');
    release();
    expect((await held).status).toBe(200);
    expect((await usageRows(h.store)).reduce((sum, r) => sum + r.units, 0)).toBe(5);
  });
});
