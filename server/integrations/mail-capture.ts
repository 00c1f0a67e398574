/**
 * A local SMTP capture server for development and tests (the `smtp-server` package): loopback
 * only, no authentication, no TLS; every message received is parsed minimally (headers, the
 * text/plain and text/html parts) and stored in captured_mail, which the console's dev-only
 * outbox (GET /console-api/outbox) shows.
 *
 *   const capture = await startMailCapture({ store, port: 0 });   // 0: a random free port
 *   config.smtpUrl = `smtp://127.0.0.1:${capture.port}`;
 *   ...
 *   await capture.close();
 *
 * The parser handles what nodemailer sends: folded headers, RFC 2047 encoded words (B and Q),
 * multipart/* bodies (nested), quoted-printable and base64 transfer encodings. It is not a
 * general MIME parser.
 */
import type { AddressInfo } from 'node:net';
import { SMTPServer } from 'smtp-server';
import type { Store } from '../db/store.js';

export interface MailCapture {
  port: number;
  /** smtp://127.0.0.1:<port>, for SMTP_URL. */
  url: string;
  close(): Promise<void>;
}

const MAX_MESSAGE_BYTES = 2 * 1024 * 1024;

export interface ParsedMessage {
  headers: Map<string, string>;
  subject: string;
  text: string | null;
  html: string | null;
}

/** Splits a header block into (lower-case name → unfolded value); the first occurrence wins. */
function parseHeaders(block: string): Map<string, string> {
  const headers = new Map<string, string>();
  const unfolded = block.replace(/\r?\n[ \t]+/g, ' ');
  for (const line of unfolded.split(/\r?\n/)) {
    const colon = line.indexOf(':');
    if (colon <= 0) continue;
    const name = line.slice(0, colon).trim().toLowerCase();
    if (!headers.has(name)) headers.set(name, line.slice(colon + 1).trim());
  }
  return headers;
}

function decodeBytes(bytes: Buffer, charset: string): string {
  try {
    return new TextDecoder(charset.toLowerCase() === 'us-ascii' ? 'utf-8' : charset).decode(bytes);
  } catch {
    return bytes.toString('utf8');
  }
}

/** RFC 2047 encoded words (=?charset?B|Q?text?=); adjacent encoded words join without the space. */
export function decodeEncodedWords(value: string): string {
  return value
    .replace(/(=\?[^?]+\?[BbQq]\?[^?]*\?=)\s+(?==\?)/g, '$1')
    .replace(/=\?([^?]+)\?([BbQq])\?([^?]*)\?=/g, (_m, charset: string, enc: string, text: string) => {
      if (enc.toUpperCase() === 'B') return decodeBytes(Buffer.from(text, 'base64'), charset);
      const bytes = text
        .replace(/_/g, ' ')
        .replace(/=([0-9A-Fa-f]{2})/g, (_x, hex: string) => String.fromCharCode(parseInt(hex, 16)));
      return decodeBytes(Buffer.from(bytes, 'latin1'), charset);
    });
}

/** Quoted-printable (RFC 2045 §6.7) to bytes. */
function decodeQuotedPrintable(text: string): Buffer {
  const joined = text.replace(/=\r?\n/g, '');
  const bytes: number[] = [];
  for (let i = 0; i < joined.length; i++) {
    const c = joined[i]!;
    const hex = joined.slice(i + 1, i + 3);
    if (c === '=' && /^[0-9A-Fa-f]{2}$/.test(hex)) {
      bytes.push(parseInt(hex, 16));
      i += 2;
    } else {
      bytes.push(...Buffer.from(c, 'utf8'));
    }
  }
  return Buffer.from(bytes);
}

function headerParam(value: string, name: string): string | undefined {
  const m = new RegExp(`;\\s*${name}\\s*=\\s*(?:"([^"]*)"|([^;\\s]+))`, 'i').exec(value);
  return m ? (m[1] ?? m[2]) : undefined;
}

function splitHeadBody(raw: string): { head: string; body: string } {
  const m = /\r?\n\r?\n/.exec(raw);
  if (!m) return { head: raw, body: '' };
  return { head: raw.slice(0, m.index), body: raw.slice(m.index + m[0].length) };
}

function collectParts(raw: string, out: { text: string | null; html: string | null }, depth = 0): void {
  const { head, body } = splitHeadBody(raw);
  const headers = parseHeaders(head);
  const type = headers.get('content-type') ?? 'text/plain';
  const mediaType = type.split(';')[0]!.trim().toLowerCase();
  if (mediaType.startsWith('multipart/') && depth < 5) {
    const boundary = headerParam(type, 'boundary');
    if (!boundary) return;
    const pieces = body.split(`--${boundary}`);
    for (const piece of pieces.slice(1)) {
      if (piece.startsWith('--')) break;
      collectParts(piece.replace(/^\r?\n/, ''), out, depth + 1);
    }
    return;
  }
  if (mediaType !== 'text/plain' && mediaType !== 'text/html') return;
  const encoding = (headers.get('content-transfer-encoding') ?? '7bit').toLowerCase();
  const charset = headerParam(type, 'charset') ?? 'utf-8';
  const bytes =
    encoding === 'base64'
      ? Buffer.from(body.replace(/\s+/g, ''), 'base64')
      : encoding === 'quoted-printable'
        ? decodeQuotedPrintable(body)
        : Buffer.from(body, 'utf8');
  const text = decodeBytes(bytes, charset).replace(/\r\n/g, '\n').replace(/\n+$/, '');
  if (mediaType === 'text/plain' && out.text === null) out.text = text;
  if (mediaType === 'text/html' && out.html === null) out.html = text;
}

/** Headers, subject and the first text/plain and text/html parts of an RFC 5322 message. */
export function parseMessage(raw: string): ParsedMessage {
  const { head } = splitHeadBody(raw);
  const headers = parseHeaders(head);
  const out: { text: string | null; html: string | null } = { text: null, html: null };
  collectParts(raw, out);
  return { headers, subject: decodeEncodedWords(headers.get('subject') ?? ''), ...out };
}

/** Starts the capture server on 127.0.0.1 (port 0: random free port). */
export function startMailCapture(opts: {
  store: Store;
  port?: number;
  clock?: () => Date;
}): Promise<MailCapture> {
  const clock = opts.clock ?? (() => new Date());
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    hideSTARTTLS: true,
    size: MAX_MESSAGE_BYTES,
    banner: 'Ebullio local mail capture (development only)',
    logger: false,
    onConnect(session, callback) {
      const ip = session.remoteAddress.replace(/^::ffff:/, '');
      if (ip !== '127.0.0.1' && ip !== '::1') return callback(new Error('loopback connections only'));
      callback();
    },
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (chunk: Buffer) => chunks.push(chunk));
      stream.on('end', () => {
        if ((stream as unknown as { sizeExceeded?: boolean }).sizeExceeded) {
          return callback(Object.assign(new Error('message too large'), { responseCode: 552 }));
        }
        // The message is accepted only once it is stored: a failed insert is the sender's error.
        const store = async () => {
          const raw = Buffer.concat(chunks).toString('utf8');
          const parsed = parseMessage(raw);
          const mailFrom = session.envelope.mailFrom;
          const { capturedMail } = opts.store.t;
          await opts.store.db.insert(capturedMail).values({
            receivedAt: clock(),
            from: mailFrom ? mailFrom.address : (parsed.headers.get('from') ?? ''),
            to: session.envelope.rcptTo.map((r) => r.address),
            subject: parsed.subject,
            text: parsed.text,
            html: parsed.html,
            raw,
          });
        };
        store().then(
          () => callback(),
          (err: unknown) => callback(err as Error),
        );
      });
    },
  });
  return new Promise((resolve, reject) => {
    server.on('error', reject);
    server.listen(opts.port ?? 0, '127.0.0.1', () => {
      const { port } = server.server.address() as AddressInfo;
      server.server.unref();
      resolve({
        port,
        url: `smtp://127.0.0.1:${port}`,
        close: () => new Promise<void>((done) => server.close(() => done())),
      });
    });
  });
}
