// The mail outbox: a message is stored before sending, survives an unreachable SMTP server and is
// sent by the retry; invitation HTML escapes what users typed. (Outbox pattern: common practice, no source.)
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import net from 'node:net';
import nodemailer from 'nodemailer';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, openDb, type Db } from '../../server/db/client';
import { runMigrations } from '../../server/db/migrate';
import { mailOutbox } from '../../server/db/schema';
import { createMailService } from '../../server/services/mail';
import { escapeHtml, render } from '../../server/services/templates';
import { startSmtpFake } from '../helpers/testServer';

let db: Db;
let dir: string;
beforeAll(() => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tocsin-mail-'));
  db = openDb(path.join(dir, 'm.sqlite'));
  runMigrations(db);
});
afterAll(() => {
  closeDb(db);
  fs.rmSync(dir, { recursive: true, force: true });
});

/** A port with nothing listening on it. */
async function deadPort(): Promise<number> {
  const s = net.createServer();
  await new Promise<void>((r) => s.listen(0, '127.0.0.1', r));
  const port = (s.address() as net.AddressInfo).port;
  await new Promise<void>((r) => s.close(() => r()));
  return port;
}

describe('mail outbox', () => {
  it('keeps a message pending when SMTP is down and sends it on retry', async () => {
    const down = nodemailer.createTransport({ host: '127.0.0.1', port: await deadPort(), ignoreTLS: true, connectionTimeout: 2000 });
    const failing = createMailService(db, down, 'Tocsin <tocsin@hspdo.example>');
    const id = await failing.send({ to: 'someone@hspdo.example', subject: 'Retry me', text: 'Body' });
    let row = db.select().from(mailOutbox).all().find((r) => r.id === id)!;
    expect(row.status).toBe('pending');
    expect(row.attempts).toBe(1);
    expect(row.lastError).toBeTruthy();

    const smtp = await startSmtpFake();
    try {
      const up = nodemailer.createTransport({ host: '127.0.0.1', port: smtp.port, ignoreTLS: true });
      const working = createMailService(db, up, 'Tocsin <tocsin@hspdo.example>');
      await working.deliverPending();
      row = db.select().from(mailOutbox).all().find((r) => r.id === id)!;
      expect(row.status).toBe('sent');
      expect(row.attempts).toBe(2);
      const got = await smtp.messages();
      expect(got).toHaveLength(1);
      expect(got[0]).toMatchObject({ subject: 'Retry me', to: ['someone@hspdo.example'] });
      // Sent once only: a second retry pass sends nothing more.
      await working.deliverPending();
      expect(await smtp.messages()).toHaveLength(1);
      up.close();
    } finally {
      await smtp.close();
      down.close();
    }
  });
});

describe('e-mail templates', () => {
  it('escape HTML in values (OWASP XSS Prevention Cheat Sheet, rule 1: HTML entity encoding)', () => {
    expect(escapeHtml(`<b>"Tom" & 'Ann'</b>`)).toBe('&lt;b&gt;&quot;Tom&quot; &amp; &#39;Ann&#39;&lt;/b&gt;');
    const values = { name: '<script>x</script>', email: 'a@b.example', officeName: 'HSPDO', inviterName: 'Ada', link: 'http://localhost/invite/abc', expiresOn: '2031-01-08 10:00 UTC' };
    const html = render('email/invitation.html', values);
    expect(html).not.toContain('<script>');
    expect(html).toContain('&lt;script&gt;x&lt;/script&gt;');
    expect(render('email/invitation.txt', values)).toContain('<script>x</script>'); // plain text is not escaped
  });

  it('refuse to render with a missing value', () => {
    expect(() => render('email/invitation.txt', { name: 'x' })).toThrow(/no value/);
  });
});
