/**
 * A job's callback: the URL is checked when the job is submitted (https, and every address its
 * name resolves to public: no loopback, link-local, private, shared, multicast or reserved
 * address, IPv4 or IPv6, IPv4-mapped and the other IPv6 forms that embed an IPv4 address
 * included) and checked again when the notification is sent, by the lookup the connection itself
 * uses, so a name that resolves elsewhere by then (DNS rebinding) is refused rather than
 * followed. The setting `allowLoopbackCallbacks` (tests) lets http:// and https:// reach loopback
 * addresses, and nothing else private.
 *
 * The notification: `POST` of the job resource as JSON, with
 * `Ebullio-Job-Id: <id>`, `Ebullio-Timestamp: <Unix seconds>` and
 * `Ebullio-Signature: <hex HMAC-SHA256(secret, id + "." + timestamp + "." + body)>`, the account's
 * signing secret as the key. A receiver recomputes the signature over the bytes it received and
 * refuses stale timestamps (common practice: five minutes).
 */
import crypto from 'node:crypto';
import dns from 'node:dns';
import http from 'node:http';
import https from 'node:https';
import net from 'node:net';
import { problem, type ProblemError } from '../problem.js';

type Verdict = 'public' | 'loopback' | 'private';

/** IPv4 ranges that are not the public internet (IANA special-purpose registry, RFC 6890). */
const IPV4_PRIVATE: [number, number][] = [
  [0x00000000, 8], // "this network"
  [0x0a000000, 8], // 10/8 private
  [0x64400000, 10], // 100.64/10 shared (carrier-grade NAT)
  [0xa9fe0000, 16], // 169.254/16 link-local (cloud metadata lives here)
  [0xac100000, 12], // 172.16/12 private
  [0xc0000000, 24], // 192.0.0/24 protocol assignments
  [0xc0000200, 24], // 192.0.2/24 documentation
  [0xc0a80000, 16], // 192.168/16 private
  [0xc6120000, 15], // 198.18/15 benchmarking
  [0xc6336400, 24], // 198.51.100/24 documentation
  [0xcb007100, 24], // 203.0.113/24 documentation
  [0xe0000000, 4], // 224/4 multicast
  [0xf0000000, 4], // 240/4 reserved, broadcast
];

function ipv4Verdict(a: number): Verdict {
  if (a >>> 24 === 127) return 'loopback';
  for (const [base, bits] of IPV4_PRIVATE) {
    const mask = bits === 0 ? 0 : (0xffffffff << (32 - bits)) >>> 0;
    if ((a & mask) >>> 0 === base) return 'private';
  }
  return 'public';
}

function ipv4Number(text: string): number {
  return text.split('.').reduce((n, part) => ((n << 8) | Number(part)) >>> 0, 0);
}

/** The 16 bytes of an IPv6 address (with `::` and a trailing dotted IPv4 part). */
function ipv6Bytes(text: string): number[] {
  let address = text.split('%')[0]!.toLowerCase();
  const tail: number[] = [];
  const dotted = /(\d+\.\d+\.\d+\.\d+)$/.exec(address);
  if (dotted) {
    const v4 = ipv4Number(dotted[1]!);
    tail.push(v4 >>> 24, (v4 >>> 16) & 255, (v4 >>> 8) & 255, v4 & 255);
    address = address.slice(0, -dotted[1]!.length);
    if (!address.endsWith('::')) address = address.replace(/:$/, '');
  }
  const [head, rest] = address.includes('::') ? address.split('::') : [address, undefined];
  const groups = (s: string | undefined) => (s ? s.split(':').filter((g) => g !== '') : []);
  const left = groups(head);
  const right = groups(rest);
  const words = 8 - tail.length / 2;
  const fill = rest === undefined ? 0 : words - left.length - right.length;
  const all = [...left, ...Array<string>(Math.max(0, fill)).fill('0'), ...right].slice(0, words);
  const bytes = all.flatMap((g) => {
    const v = parseInt(g, 16) || 0;
    return [v >> 8, v & 255];
  });
  return [...bytes, ...tail];
}

function ipv6Verdict(text: string): Verdict {
  const b = ipv6Bytes(text);
  const v4 = (i: number) => ((b[i]! << 24) | (b[i + 1]! << 16) | (b[i + 2]! << 8) | b[i + 3]!) >>> 0;
  const zeros = (from: number, to: number) => b.slice(from, to).every((x) => x === 0);
  // IPv4-mapped ::ffff:a.b.c.d, IPv4-compatible ::a.b.c.d, NAT64 64:ff9b::/96, 6to4 2002::/16: the IPv4 inside decides.
  if (zeros(0, 10) && b[10] === 0xff && b[11] === 0xff) return ipv4Verdict(v4(12));
  if (zeros(0, 12)) {
    if (zeros(12, 15) && b[15] === 1) return 'loopback'; // ::1
    if (zeros(12, 16)) return 'private'; // ::
    return ipv4Verdict(v4(12));
  }
  if (b[0] === 0x00 && b[1] === 0x64 && b[2] === 0xff && b[3] === 0x9b && zeros(4, 12))
    return ipv4Verdict(v4(12));
  if (b[0] === 0x20 && b[1] === 0x02) return ipv4Verdict(v4(2));
  if (b[0] === 0xfe && (b[1]! & 0xc0) === 0x80) return 'private'; // fe80::/10 link-local
  if (b[0] === 0xfe && (b[1]! & 0xc0) === 0xc0) return 'private'; // fec0::/10 site-local (deprecated)
  if ((b[0]! & 0xfe) === 0xfc) return 'private'; // fc00::/7 unique local
  if (b[0] === 0xff) return 'private'; // multicast
  if (b[0] === 0x20 && b[1] === 0x01 && b[2] === 0x0d && b[3] === 0xb8) return 'private'; // documentation
  if (b[0] === 0x01 && zeros(1, 8)) return 'private'; // 100::/64 discard
  return 'public';
}

/** Whether an address is public, loopback or otherwise private (any IPv4 or IPv6 text). */
export function addressVerdict(address: string): Verdict {
  const family = net.isIP(address);
  if (family === 4) return ipv4Verdict(ipv4Number(address));
  if (family === 6) return ipv6Verdict(address);
  return 'private';
}

function refusal(field: string, message: string): ProblemError {
  return problem('validation-failed', `${field}: ${message}.`, { errors: [{ field, message }] });
}

/** Why these addresses may not be called (undefined: they may). */
function addressesRefused(
  addresses: readonly string[],
  allowLoopback: boolean,
  scheme: string,
): string | undefined {
  for (const address of addresses) {
    const verdict = addressVerdict(address);
    if (verdict === 'private') return `resolves to ${address}, a private, link-local or reserved address`;
    if (verdict === 'loopback' && !allowLoopback) return `resolves to ${address}, a loopback address`;
    if (verdict === 'public' && scheme !== 'https:') return 'must use https';
  }
  return undefined;
}

async function resolveAll(host: string): Promise<string[]> {
  if (net.isIP(host)) return [host];
  const found = await dns.promises.lookup(host, { all: true, verbatim: true });
  return found.map((a) => a.address);
}

/**
 * Checks a callback URL (422 naming `field` otherwise): https (http only to loopback, and only
 * with `allowLoopback`), no user name or password, and every address its host resolves to public.
 */
export async function checkCallbackUrl(raw: string, field: string, allowLoopback: boolean): Promise<URL> {
  let url: URL;
  try {
    url = new URL(raw);
  } catch {
    throw refusal(field, 'is not an absolute URL');
  }
  if (url.protocol !== 'https:' && !(allowLoopback && url.protocol === 'http:'))
    throw refusal(field, 'must use https');
  if (url.username !== '' || url.password !== '')
    throw refusal(field, 'must not carry a user name or password');
  const host = url.hostname.replace(/^\[|\]$/g, '');
  let addresses: string[];
  try {
    addresses = await resolveAll(host);
  } catch {
    throw refusal(field, `names the host ${host}, which does not resolve`);
  }
  if (addresses.length === 0) throw refusal(field, `names the host ${host}, which does not resolve`);
  const why = addressesRefused(addresses, allowLoopback, url.protocol);
  if (why) throw refusal(field, why);
  return url;
}

/** The signature of a notification: hex HMAC-SHA256 of `<id>.<timestamp>.<body>`. */
export function signCallback(secret: string, id: string, timestamp: string, body: string): string {
  return crypto.createHmac('sha256', secret).update(`${id}.${timestamp}.${body}`).digest('hex');
}

/**
 * Sends one notification; resolves with whether the receiver answered 2xx and the outcome in
 * words. The connection's own lookup checks the addresses again (DNS rebinding), and an IP
 * literal is checked before connecting. Never rejects.
 */
export async function sendCallback(opts: {
  url: string;
  jobId: string;
  body: string;
  secret: string;
  allowLoopback: boolean;
  timeoutMs: number;
  now: Date;
}): Promise<{ delivered: boolean; outcome: string }> {
  let url: URL;
  try {
    url = new URL(opts.url);
  } catch {
    return { delivered: false, outcome: 'the URL is not valid' };
  }
  const host = url.hostname.replace(/^\[|\]$/g, '');
  if (net.isIP(host)) {
    const why = addressesRefused([host], opts.allowLoopback, url.protocol);
    if (why) return { delivered: false, outcome: `refused: ${why}` };
  }
  const timestamp = String(Math.floor(opts.now.getTime() / 1000));
  const signature = signCallback(opts.secret, opts.jobId, timestamp, opts.body);
  const lookup: net.LookupFunction = (hostname, options, callback) => {
    dns.lookup(hostname, { all: true, verbatim: true }, (err, found) => {
      if (err) return callback(err, '', 0);
      const why = addressesRefused(
        found.map((a) => a.address),
        opts.allowLoopback,
        url.protocol,
      );
      if (why || found.length === 0) return callback(new Error(`refused: ${why ?? 'no address'}`), '', 0);
      if ((options as { all?: boolean }).all)
        return (callback as unknown as (e: null, a: dns.LookupAddress[]) => void)(null, found);
      callback(null, found[0]!.address, found[0]!.family);
    });
  };
  const client = url.protocol === 'https:' ? https : http;
  return new Promise((resolve) => {
    const req = client.request(
      url,
      {
        method: 'POST',
        lookup,
        timeout: opts.timeoutMs,
        headers: {
          'Content-Type': 'application/json',
          'Content-Length': Buffer.byteLength(opts.body),
          'User-Agent': 'Ebullio-Callback/1',
          'Ebullio-Job-Id': opts.jobId,
          'Ebullio-Timestamp': timestamp,
          'Ebullio-Signature': signature,
        },
      },
      (res) => {
        res.resume();
        res.on('end', () => {
          const status = res.statusCode ?? 0;
          resolve({ delivered: status >= 200 && status < 300, outcome: `answered ${status}` });
        });
        res.on('error', (err) => resolve({ delivered: false, outcome: `failed: ${err.message}` }));
      },
    );
    req.on('timeout', () => req.destroy(new Error(`no answer within ${opts.timeoutMs} ms`)));
    req.on('error', (err) => resolve({ delivered: false, outcome: `failed: ${err.message}` }));
    req.end(opts.body);
  });
}
