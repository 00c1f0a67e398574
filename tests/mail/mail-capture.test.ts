// Mail: nodemailer → SMTP on a real loopback socket → the smtp-server capture → captured_mail,
// and the capture's minimal MIME parsing. Sources: RFC 2047 §8 examples (encoded words; the
// strings are from memory of that section), RFC 2045 §6.7 (quoted-printable soft line breaks) and
// §6.8 (base64), RFC 2046 §5.1 (multipart boundaries), RFC 5322 §2.2.3 (header folding).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  decodeEncodedWords,
  parseMessage,
  startMailCapture,
  type MailCapture,
} from '../../server/integrations/mail-capture.js';
import { sendMail } from '../../server/mail/send.js';
import { makeHarness, type Harness } from '../http/helpers.js';

describe('decodeEncodedWords', () => {
  it('decodes the RFC 2047 section 8 examples', () => {
    // RFC 2047 §8 (from memory): Q encoding in ISO-8859-1, underscore as space, adjacent words joined.
    expect(decodeEncodedWords('=?ISO-8859-1?Q?Andr=E9?= Pirard')).toBe('André Pirard');
    expect(decodeEncodedWords('=?US-ASCII?Q?Keith_Moore?=')).toBe('Keith Moore');
    expect(decodeEncodedWords('=?ISO-8859-1?Q?a?= =?ISO-8859-1?Q?b?=')).toBe('ab');
    expect(decodeEncodedWords('=?ISO-8859-1?Q?a?= b')).toBe('a b');
  });

  it('decodes B encoding in UTF-8', () => {
    // RFC 2047 §4.1: "B" is base64 (RFC 2045 §6.8) of the charset's bytes; "Dühring" in UTF-8.
    expect(decodeEncodedWords(`=?UTF-8?B?${Buffer.from('Dühring', 'utf8').toString('base64')}?=`)).toBe(
      'Dühring',
    );
  });
});

describe('parseMessage', () => {
  it('unfolds headers and reads the text and HTML parts of a multipart/alternative message', () => {
    const raw = [
      'From: a@ebullio.invalid',
      'Subject: a folded',
      ' subject line', // RFC 5322 §2.2.3: folding whitespace is removed by unfolding CRLF
      'Content-Type: multipart/alternative; boundary="b1"',
      '',
      '--b1', // RFC 2046 §5.1.1: "--" + boundary delimits parts, "--b1--" ends them
      'Content-Type: text/plain; charset=utf-8',
      'Content-Transfer-Encoding: quoted-printable',
      '',
      'Evaporator =C3=BCber soft=',
      'break',
      '--b1',
      'Content-Type: text/html; charset=utf-8',
      'Content-Transfer-Encoding: base64',
      '',
      Buffer.from('<p>Brix</p>').toString('base64'),
      '--b1--',
      '',
    ].join('\r\n');
    const m = parseMessage(raw);
    expect(m.subject).toBe('a folded subject line');
    // RFC 2045 §6.7 rule 5: "=" at line end is a soft break; "=C3=BC" are the UTF-8 bytes of ü.
    expect(m.text).toBe('Evaporator über softbreak');
    expect(m.html).toBe('<p>Brix</p>');
  });
});

describe('sendMail through the capture server', () => {
  let capture: MailCapture;
  let h: Harness;
  beforeAll(async () => {
    h = await makeHarness();
    capture = await startMailCapture({ store: h.store, port: 0, clock: () => h.clock.now });
    h.config.smtpUrl = capture.url;
  });
  afterAll(async () => {
    await capture.close();
  });

  it('delivers a message over SMTP on loopback, stored with its non-ASCII subject and long text intact', async () => {
    const long = 'Heating steam at 3 barg, ' + 'liquor at 30 % NaOH; '.repeat(12) + 'end.';
    const result = await sendMail(h.deps, {
      kind: 'quota-80',
      to: 'ops@ebullio.invalid',
      subject: 'Kontingent zu 80 % verbraucht — Dühring-Tabelle',
      text: `Hello,\n\n${long}\n`,
      html: '<p>Hello</p>',
    });
    expect(result.status).toBe('sent');
    const { capturedMail, mailLog } = h.store.t;
    const [row] = await h.store.db.select().from(capturedMail).limit(1);
    expect(row?.from).toBe('no-reply@ebullio.invalid');
    expect(row?.to).toEqual(['ops@ebullio.invalid']);
    expect(row?.subject).toBe('Kontingent zu 80 % verbraucht — Dühring-Tabelle');
    expect(row?.text).toBe(`Hello,\n\n${long}`);
    expect(row?.html).toBe('<p>Hello</p>');
    const log = await h.store.db
      .select({ kind: mailLog.kind, status: mailLog.status, error: mailLog.error })
      .from(mailLog);
    expect(log).toEqual([{ kind: 'quota-80', status: 'sent', error: null }]);
  });

  it('logs a failure instead of throwing when the SMTP server cannot be reached', async () => {
    const closed = await startMailCapture({ store: h.store, port: 0 });
    await closed.close();
    const h2 = await makeHarness({ config: { smtpUrl: closed.url } });
    const result = await sendMail(h2.deps, {
      kind: 'key-revoked',
      to: 'x@ebullio.invalid',
      subject: 's',
      text: 't',
    });
    expect(result.status).toBe('failed');
    const { mailLog } = h2.store.t;
    expect(await h2.store.db.select({ status: mailLog.status }).from(mailLog)).toEqual([
      { status: 'failed' },
    ]);
  });

  it('does not fall back to the capture server in production', async () => {
    const h3 = await makeHarness({ config: { nodeEnv: 'production' } });
    const result = await sendMail(h3.deps, {
      kind: 'invitation',
      to: 'x@ebullio.invalid',
      subject: 's',
      text: 't',
    });
    expect(result.status).toBe('failed');
    expect(result.error).toMatch(/SMTP_URL/);
  });
});
