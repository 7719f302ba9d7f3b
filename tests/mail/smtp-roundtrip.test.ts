/**
 * A real SMTP conversation: the template goes into the outbox table, `deliverPendingMail` sends it with
 * nodemailer to the local smtp-server, which parses it with mailparser and stores it; we read it back through
 * `listLocalMail` / `getLocalMail`. Independent checks: the PNG signature (ISO/IEC 15948 §5.2, bytes
 * 89 50 4E 47 0D 0A 1A 0A) of the received attachment, and a second, independent parse of the stored raw
 * message with mailparser's simpleParser.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { simpleParser } from 'mailparser';
import type { Db } from '@/db/client';
import { getOutgoingMail } from '@/db/queries/mail';
import { mailConfigFromEnv } from '@/lib/mail/config';
import { getLocalMail, listLocalMail, startLocalSmtp, type LocalMail, type LocalSmtpServer } from '@/lib/mail/local-smtp';
import { deliverPendingMail, queueMail } from '@/lib/mail/outbox';
import { invitationMail, passwordResetMail, reportMail } from '@/lib/mail/templates';
import { createMailer, type Mailer } from '@/lib/mail/transport';
import { renderDeviationMapPng } from '@/lib/mail/map-image';
import { buildReport } from '../pdf/report-fixture';
import { migratedDb, tempDir } from './helpers';

let cleanup: () => Promise<void>;
let mailDir: string;
let db: Db;
let workshopId: string;
let server: LocalSmtpServer;
let mailer: Mailer;
const received: LocalMail[] = [];

beforeAll(async () => {
  const t = await tempDir('mail');
  cleanup = t.cleanup;
  mailDir = `${t.dir}/inbox`;
  ({ db, workshopId } = await migratedDb(t.dir));
  server = await startLocalSmtp({ port: 0, dir: mailDir, onMessage: (m) => void received.push(m) });
  mailer = createMailer(mailConfigFromEnv({ SMTP_HOST: '127.0.0.1', SMTP_PORT: String(server.port), SMTP_SECURE: 'false', MAIL_FROM: 'Gridproof <checks@gridproof.test>' }));
});

afterAll(async () => {
  mailer.close();
  await server.close();
  db.$client.close();
  await cleanup();
});

describe('mail over a real SMTP round trip', () => {
  it('delivers a shared report with its link, both parts and the deviation map inline', async () => {
    const png = await renderDeviationMapPng(buildReport());
    const link = 'https://gridproof.test/s/4b0c1e0d9a7f4d3c8e2b1a6f5c4d3e2f';
    const content = reportMail({
      workshopName: 'North Bench <Shop>',
      senderName: 'Ada "Router" Vale',
      bedName: 'Main spoilboard',
      checkTitle: 'After resurfacing',
      linkUrl: link,
      linkExpiresAt: Date.UTC(2026, 11, 16, 9, 30),
      verdict: 'marginal',
      verdictSentence: 'Marginal: 3 inserts on panel P2 are close to the limit; reseat P2 0.18 mm to the left.',
      note: 'Can you look at row D?\n<script>alert(1)</script> & thanks',
      map: { content: png, contentType: 'image/png' },
    });
    const id = await db.transaction(async (tx) => queueMail(tx, 'helper@example.test', 'report', content, workshopId));

    const result = await deliverPendingMail(db, mailer.transport);
    expect(result).toEqual({ sent: 1, retrying: 0, failed: 0 });
    const row = await getOutgoingMail(db, id);
    expect(row?.status).toBe('sent');
    expect(row?.attempts).toBe(1);
    expect(row?.messageId).toMatch(/@/);

    expect(received).toHaveLength(1);
    const mail = received[0]!;
    expect(mail.subject).toBe('Ada "Router" Vale shared a bed check: Main spoilboard — After resurfacing (marginal)');
    expect(mail.to).toEqual(['helper@example.test']);
    expect(mail.from).toContain('checks@gridproof.test');
    // Plain-text part: app, workshop, verdict sentence, note verbatim, the link.
    expect(mail.text).toContain('Gridproof');
    expect(mail.text).toContain('North Bench <Shop>');
    expect(mail.text).toContain('reseat P2 0.18 mm to the left');
    expect(mail.text).toContain('<script>alert(1)</script> & thanks');
    expect(mail.text).toContain(link);
    expect(mail.text).toContain('2026-12-16 09:30 UTC');
    // HTML part: the same, with everything user-given escaped.
    const html = mail.html ?? '';
    expect(html).toContain(`href="${link}"`);
    expect(html).toContain('North Bench &lt;Shop&gt;');
    expect(html).toContain('Ada &quot;Router&quot; Vale');
    expect(html).toContain('&lt;script&gt;alert(1)&lt;/script&gt; &amp; thanks');
    expect(html).not.toContain('<script>');
    // The map arrived as an inline attachment that the HTML references by Content-ID.
    expect(mail.attachments).toHaveLength(1);
    const att = mail.attachments[0]!;
    expect(att.contentType).toBe('image/png');
    expect(att.disposition).toBe('inline');
    expect(att.cid).toBeTruthy();
    expect(html).toContain(`cid:${att.cid}`);
    expect(html).not.toContain('data:image/png');

    // The stored copy: listed, and its raw message parses independently to the same bytes.
    const listed = await listLocalMail({ dir: mailDir });
    expect(listed.map((m) => m.id)).toContain(mail.id);
    const full = await getLocalMail(mail.id, { dir: mailDir });
    expect(full).not.toBeNull();
    const again = await simpleParser(full!.raw);
    const bytes = again.attachments[0]!.content;
    expect(Buffer.compare(bytes, png)).toBe(0);
    // PNG signature, ISO/IEC 15948 §5.2.
    expect([...bytes.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    expect(full!.htmlWithInlineImages).toContain('data:image/png;base64,');
    expect(await getLocalMail('../../etc/passwd', { dir: mailDir })).toBeNull();
  });

  it('delivers an invitation and a password reset with their links and expiry', async () => {
    const before = received.length;
    const expires = Date.UTC(2026, 11, 9, 14, 5);
    await db.transaction(async (tx) => {
      await queueMail(tx, 'new.member@example.test', 'invitation', invitationMail({
        workshopName: 'North Bench <Shop>', inviterName: 'Ada Vale', role: 'reviewer',
        acceptUrl: 'https://gridproof.test/invite/abc123', expiresAt: expires,
      }), workshopId);
      await queueMail(tx, 'ada@example.test', 'password-reset', passwordResetMail({
        userName: 'Ada', workshopName: 'North Bench <Shop>', resetUrl: 'https://gridproof.test/reset/xyz789', expiresAt: expires,
      }), workshopId);
    });
    expect(await deliverPendingMail(db, mailer)).toEqual({ sent: 2, retrying: 0, failed: 0 });
    const got = received.slice(before);
    const invite = got.find((m) => m.to.includes('new.member@example.test'));
    const reset = got.find((m) => m.to.includes('ada@example.test'));
    expect(invite?.subject).toBe('Ada Vale invites you to the workshop North Bench <Shop> on Gridproof');
    expect(invite?.text).toContain('as reviewer');
    expect(invite?.text).toContain('https://gridproof.test/invite/abc123');
    expect(invite?.text).toContain('works once and until 2026-12-09 14:05 UTC');
    expect(invite?.html).toContain('href="https://gridproof.test/invite/abc123"');
    expect(invite?.html).toContain('North Bench &lt;Shop&gt;');
    expect(reset?.subject).toBe('Choose a new Gridproof password');
    expect(reset?.text).toContain('https://gridproof.test/reset/xyz789');
    expect(reset?.html).toContain('href="https://gridproof.test/reset/xyz789"');
    expect(reset?.html).toContain('North Bench &lt;Shop&gt;');
  });
});
