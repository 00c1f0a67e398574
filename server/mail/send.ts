/**
 * Outgoing mail: nodemailer over SMTP, every attempt logged in mail_log (sent or failed).
 *
 *   await sendMail(deps, { kind: 'key-created', to: 'dev@example.invalid', subject: '…', text: '…' });
 *
 * SMTP server: config SMTP_URL; when it is unset outside production, a local capture server
 * (server/integrations/mail-capture.ts) is started on a random loopback port the first time mail
 * is sent, storing into the same database (captured_mail → the console outbox). In production
 * without SMTP_URL the attempt is logged as failed. sendMail never throws: a failure is returned
 * and logged, so a mail problem cannot fail the request that triggered it.
 */
import nodemailer, { type Transporter } from 'nodemailer';
import { consoleSettings } from '../config.js';
import type { Store } from '../db/store.js';
import type { AppDeps } from '../deps.js';
import { startMailCapture, type MailCapture } from '../integrations/mail-capture.js';

export const mailKinds = [
  'invitation',
  'password-reset',
  'key-created',
  'key-revoked',
  'quota-80',
  'quota-100',
  'statement-ready',
] as const;
export type MailKind = (typeof mailKinds)[number];

export interface MailInput {
  kind: MailKind;
  to: string;
  subject: string;
  text: string;
  html?: string;
}

export interface MailResult {
  status: 'sent' | 'failed';
  mailLogId: number;
  messageId: string | null;
  error: string | null;
}

const transports = new Map<string, Transporter>();
const captures = new WeakMap<Store, Promise<MailCapture>>();

function transportFor(url: string, local: boolean): Transporter {
  let t = transports.get(url);
  if (!t) {
    t = nodemailer.createTransport({
      url,
      ...(local ? { ignoreTLS: true } : {}),
      connectionTimeout: 10_000,
      greetingTimeout: 10_000,
      socketTimeout: 20_000,
    } as Parameters<typeof nodemailer.createTransport>[0]);
    transports.set(url, t);
  }
  return t;
}

/** The local capture server for this store (started on first use; development and tests only). */
export function defaultMailCapture(deps: Pick<AppDeps, 'store' | 'clock'>): Promise<MailCapture> {
  let capture = captures.get(deps.store);
  if (!capture) {
    capture = startMailCapture({ store: deps.store, port: 0, clock: deps.clock });
    captures.set(deps.store, capture);
  }
  return capture;
}

async function smtpTarget(deps: AppDeps): Promise<{ url: string; local: boolean } | undefined> {
  const settings = consoleSettings(deps.config);
  if (settings.smtpUrl)
    return { url: settings.smtpUrl, local: /^smtp:\/\/(127\.0\.0\.1|localhost)[:/]/.test(settings.smtpUrl) };
  if (settings.production) return undefined;
  return { url: (await defaultMailCapture(deps)).url, local: true };
}

export async function sendMail(deps: AppDeps, input: MailInput): Promise<MailResult> {
  const settings = consoleSettings(deps.config);
  let messageId: string | null = null;
  let error: string | null = null;
  try {
    const target = await smtpTarget(deps);
    if (!target) throw new Error('no SMTP server configured (set SMTP_URL)');
    const info = (await transportFor(target.url, target.local).sendMail({
      from: settings.mailFrom,
      to: input.to,
      subject: input.subject,
      text: input.text,
      ...(input.html !== undefined ? { html: input.html } : {}),
      headers: { 'X-Ebullio-Mail-Kind': input.kind },
    })) as { messageId?: string };
    messageId = info.messageId ?? null;
  } catch (err) {
    error = (err as Error).message;
    console.error(`[mail] ${input.kind} to ${input.to} failed: ${error}`);
  }
  const { mailLog } = deps.store.t;
  const [row] = await deps.store.db
    .insert(mailLog)
    .values({
      at: deps.clock(),
      kind: input.kind,
      to: input.to,
      subject: input.subject,
      status: error === null ? 'sent' : 'failed',
      messageId,
      error,
    })
    .returning({ id: mailLog.id });
  return { status: error === null ? 'sent' : 'failed', mailLogId: row!.id, messageId, error };
}
