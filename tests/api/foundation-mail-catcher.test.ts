// The local SMTP catcher: mail sent by nodemailer over SMTP (RFC 5321) is parsed, listed by recipient,
// shown escaped in the inbox page, and kept on disk so a restarted catcher still has it.
import { afterEach, describe, expect, it } from 'vitest';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import nodemailer from 'nodemailer';
import { startMailCatcher, type CaughtMail, type MailCatcher } from '../../server/fakes/mail.js';

const running: MailCatcher[] = [];
afterEach(async () => {
  await Promise.all(running.splice(0).map((catcher) => catcher.close()));
});

async function start(dir: string): Promise<MailCatcher> {
  const catcher = await startMailCatcher({ smtpPort: 0, viewerPort: 0, dir });
  running.push(catcher);
  return catcher;
}

async function send(catcher: MailCatcher, to: string, subject: string, text: string): Promise<void> {
  const transport = nodemailer.createTransport({ host: '127.0.0.1', port: catcher.smtpPort, secure: false, ignoreTLS: true });
  await transport.sendMail({ from: 'Thence <no-reply@thence.test>', to, subject, text, html: `<p>${text}</p>` });
  transport.close();
}

describe('mail catcher', () => {
  it('lists mail by recipient, deletes one address only, and keeps mail across a restart', async () => {
    const dir = await fs.mkdtemp(path.join(os.tmpdir(), 'thence-mail-'));
    const first = await start(dir);
    await send(first, 'Reader.One@Example.test', 'Hello <one>', 'Open https://thence.test/verify?token=abc&x=1 please');
    await send(first, 'reader.two@example.test', 'Hello two', 'Second');

    const forOne = (await (await fetch(`${first.viewerUrl}/api/messages?to=reader.one@example.test`)).json()) as CaughtMail[];
    expect(forOne).toHaveLength(1);
    expect(forOne[0]).toMatchObject({ to: 'reader.one@example.test', from: '"Thence" <no-reply@thence.test>', subject: 'Hello <one>', html: '<p>Open https://thence.test/verify?token=abc&x=1 please</p>' });
    expect(forOne[0].text.trim()).toBe('Open https://thence.test/verify?token=abc&x=1 please');
    expect(Object.keys(forOne[0]).sort()).toEqual(['date', 'from', 'html', 'id', 'subject', 'text', 'to']);

    // The message page escapes what the mail says and makes its links clickable.
    const pageHtml = await (await fetch(`${first.viewerUrl}/messages/${forOne[0].id}`)).text();
    expect(pageHtml).toContain('Hello &lt;one&gt;');
    expect(pageHtml).toContain('<a href="https://thence.test/verify?token=abc&amp;x=1">');
    const inbox = await fetch(`${first.viewerUrl}/`);
    expect(inbox.headers.get('content-security-policy')).toContain("default-src 'none'");
    expect(await inbox.text()).toContain('Hello two');

    await first.close();
    running.splice(running.indexOf(first), 1);
    const second = await start(dir);
    const all = (await (await fetch(`${second.viewerUrl}/api/messages`)).json()) as CaughtMail[];
    expect(all.map((m) => m.subject)).toEqual(['Hello <one>', 'Hello two']);

    expect((await fetch(`${second.viewerUrl}/api/messages?to=reader.two@example.test`, { method: 'DELETE' })).status).toBe(204);
    const left = (await (await fetch(`${second.viewerUrl}/api/messages`)).json()) as CaughtMail[];
    expect(left.map((m) => m.subject)).toEqual(['Hello <one>']);
    expect((await fs.readdir(dir)).filter((name) => name.endsWith('.json'))).toHaveLength(1);
    expect((await fetch(`${second.viewerUrl}/api/messages/nope-not-an-id`)).status).toBe(404);
    await fs.rm(dir, { recursive: true, force: true });
  });
});
