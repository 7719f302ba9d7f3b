/**
 * The mail flows end to end over a real SMTP conversation with the local server (smtp-server + mailparser,
 * lib/mail's startLocalSmtp): the report sent to a helper arrives with its link and the link opens the shared
 * report; an invitation per role arrives, and accepting it creates or links the account with that role; a
 * password reset arrives, works once, and ends every session. Route handlers, a real migrated SQLite file.
 */
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { POST as resetConfirm } from '@/app/api/auth/password-reset/confirm/route';
import { POST as resetPost } from '@/app/api/auth/password-reset/route';
import { POST as signInPost } from '@/app/api/auth/sign-in/route';
import { POST as sendPost } from '@/app/api/checks/[id]/send/route';
import { POST as acceptPost } from '@/app/api/invitations/accept/route';
import { GET as meGet } from '@/app/api/me/route';
import { POST as invitePost } from '@/app/api/members/route';
import { GET as sharedGet } from '@/app/api/shared/[token]/route';
import { getMembership } from '@/db/queries/memberships';
import { outgoingMail, passwordResets } from '@/db/schema';
import { createMailer, deliverPendingMail, getLocalMail, listLocalMail, startLocalSmtp, type LocalSmtpServer, type Mailer } from '@/lib/mail';
import { mailConfigFromEnv } from '@/lib/mail/config';
import type { Actor, Role } from '@/lib/services/actor';
import { SMALL_PATTERN } from '@/tests/checks/fixtures';
import { coreReport, finishedCheck } from '@/tests/services/share-fixtures';
import { addMember, call, cookieFrom, newOwner, TEST_PASSWORD, uniqueEmail, useFreshDatabase, type WebTestDb, sessionCookie } from '@/tests/web/helpers';

let t: WebTestDb;
let server: LocalSmtpServer;
let mailer: Mailer;
let owner: Actor;
let ownerCookie: string;

beforeAll(async () => {
  t = await useFreshDatabase();
  server = await startLocalSmtp({ port: 0, dir: `${t.dir}/inbox` });
  mailer = createMailer(mailConfigFromEnv({ SMTP_HOST: '127.0.0.1', SMTP_PORT: String(server.port), SMTP_SECURE: 'false', MAIL_FROM: 'Gridproof <checks@gridproof.test>' }));
  owner = await newOwner(t.db, 'Round Trip Shop');
  ownerCookie = await sessionCookie(t.db, owner);
});
afterAll(async () => {
  mailer.close();
  await server.close();
  await t.close();
});

/** Delivers the outbox and returns the newest stored message to `to`. */
async function deliveredTo(to: string) {
  const r = await deliverPendingMail(t.db, mailer);
  expect(r.failed).toBe(0);
  const found = (await listLocalMail({ dir: server.dir })).find((m) => m.to.some((a) => a.includes(to)));
  expect(found, `a message to ${to}`).toBeDefined();
  return (await getLocalMail(found!.id, { dir: server.dir }))!;
}

const linkIn = (text: string, path: string) => {
  const m = new RegExp(`https?://[^\\s"<>]+${path}/([A-Za-z0-9_-]{43})`).exec(text);
  expect(m, `a ${path} link in the mail`).not.toBeNull();
  return { url: m![0], token: m![1]! };
};

describe('report to a helper over SMTP', () => {
  it('arrives with the verdict, the note, the map and a link that opens the shared report', async () => {
    const report = coreReport(SMALL_PATTERN);
    const { checkId } = await finishedCheck(t.db, owner, SMALL_PATTERN, report, { bedName: 'Big router' });
    const helper = uniqueEmail('helper');
    const r = await call(sendPost, { cookie: ownerCookie, body: { email: helper, note: 'Is B2 as bad as it looks?' }, params: { id: checkId } });
    expect(r.status).toBe(201);
    const mail = await deliveredTo(helper);
    expect(mail.subject).toContain('Big router');
    expect(mail.text).toContain('Round Trip Shop');
    expect(mail.text).toContain('Is B2 as bad as it looks?');
    expect(mail.text).toContain(report.summary.sentence.slice(0, 30));
    // the inline map reaches the reader as a PNG (signature 89 50 4E 47 0D 0A 1A 0A, ISO/IEC 15948 §5.2)
    const png = mail.attachments.find((a) => a.contentType === 'image/png');
    expect(Buffer.from(png!.contentBase64, 'base64').subarray(0, 8).toString('hex')).toBe('89504e470d0a1a0a');
    const { url, token } = linkIn(mail.text, '/s');
    expect(url).toBe((r.json as { link: { url: string } }).link.url);
    const shared = await call(sharedGet, { params: { token }, path: new URL(url).pathname });
    expect(shared.status).toBe(200);
    expect(shared.json).toMatchObject({ bedName: 'Big router', report: { summary: { verdict: report.summary.verdict } } });
  });
});

describe('invitations by e-mail', () => {
  for (const role of ['owner', 'machinist', 'reviewer'] as const satisfies readonly Role[]) {
    it(`invites a new person as ${role}: the mail names the role, and accepting creates the account with it`, async () => {
      const email = uniqueEmail(`new-${role}`);
      const r = await call(invitePost, { cookie: ownerCookie, body: { email, role } });
      expect(r.status).toBe(201);
      const mail = await deliveredTo(email);
      expect(mail.text).toContain(`as ${role}`);
      expect(mail.text).toContain('Round Trip Shop');
      const { token } = linkIn(mail.text, '/invite');
      const a = await call(acceptPost, { body: { token, name: `New ${role}`, password: TEST_PASSWORD } });
      expect(a.status).toBe(200);
      const { user, workshopId, created } = a.json as { user: { id: string; email: string }; workshopId: string; created: boolean };
      expect(created).toBe(true);
      expect(user.email).toBe(email);
      expect(workshopId).toBe(owner.workshopId);
      expect((await getMembership(t.db, owner.workshopId, user.id))?.role).toBe(role);
      // signed in at once, acting in the workshop with that role
      const me = await call(meGet, { cookie: cookieFrom(a.setCookie) });
      expect(JSON.stringify(me.json)).toContain(role);
      // single use
      expect((await call(acceptPost, { body: { token, name: 'Again', password: TEST_PASSWORD } })).status).toBe(404);
    });
  }

  it('links an existing account that is signed in, and refuses someone signed in with another address', async () => {
    const other = await newOwner(t.db, 'Their own shop');
    const r = await call(invitePost, { cookie: ownerCookie, body: { email: other.user.email, role: 'reviewer' } });
    const { token } = linkIn((await deliveredTo(other.user.email)).text, '/invite');
    expect(r.status).toBe(201);
    const stranger = await newOwner(t.db, 'Stranger');
    const strangerCookie = await sessionCookie(t.db, stranger);
    expect((await call(acceptPost, { cookie: strangerCookie, body: { token } })).status).toBe(403);
    // signed out, the existing account must sign in first
    expect((await call(acceptPost, { body: { token, name: 'x', password: TEST_PASSWORD } })).status).toBe(409);
    const otherCookie = await sessionCookie(t.db, other);
    const a = await call(acceptPost, { cookie: otherCookie, body: { token } });
    expect(a.status).toBe(200);
    expect((a.json as { created: boolean }).created).toBe(false);
    expect((await getMembership(t.db, owner.workshopId, other.user.id))?.role).toBe('reviewer');
    expect((await getMembership(t.db, other.workshopId, other.user.id))?.role).toBe('owner');
  });

  it("queues no mail for a machinist's invitation (owners only)", async () => {
    const m = await addMember(t.db, owner.workshopId, 'machinist');
    const mc = await sessionCookie(t.db, m);
    const email = uniqueEmail('refused');
    expect((await call(invitePost, { cookie: mc, body: { email, role: 'reviewer' } })).status).toBe(403);
    expect(await t.db.select().from(outgoingMail).where(eq(outgoingMail.toAddress, email))).toHaveLength(0);
  });
});

describe('password reset by e-mail', () => {
  it('answers the same for an unknown address and sends nothing', async () => {
    const email = uniqueEmail('nobody');
    const r = await call(resetPost, { body: { email } });
    expect(r.status).toBe(202);
    expect(await t.db.select().from(outgoingMail).where(eq(outgoingMail.toAddress, email))).toHaveLength(0);
  });

  it('mails a one-hour single-use link; using it changes the password and ends every session', async () => {
    const user = await addMember(t.db, owner.workshopId, 'reviewer');
    const oldCookie = await sessionCookie(t.db, user);
    expect((await call(meGet, { cookie: oldCookie })).status).toBe(200);
    expect((await call(resetPost, { body: { email: user.user.email.toUpperCase() } })).status).toBe(202);
    const mail = await deliveredTo(user.user.email);
    const { token } = linkIn(mail.text, '/reset-password');
    const [row] = await t.db.select().from(passwordResets).where(eq(passwordResets.userId, user.user.id));
    expect(row!.expiresAt - row!.createdAt).toBeGreaterThan(3600e3 - 1000);
    expect(row!.expiresAt - row!.createdAt).toBeLessThan(3600e3 + 1000);
    const weak = await call(resetConfirm, { body: { token, password: 'short' } });
    expect(weak.status).toBe(422);
    expect(JSON.stringify(weak.json)).not.toContain('short"');
    const newPassword = 'a new and longer passphrase';
    expect((await call(resetConfirm, { body: { token, password: newPassword } })).status).toBe(200);
    expect((await call(meGet, { cookie: oldCookie })).status).toBe(401);
    expect((await call(resetConfirm, { body: { token, password: 'yet another passphrase' } })).status).toBe(404);
    expect((await call(signInPost, { body: { email: user.user.email, password: TEST_PASSWORD } })).status).toBe(401);
    expect((await call(signInPost, { body: { email: user.user.email, password: newPassword } })).status).toBe(200);
  });

  it('refuses an expired or tampered reset token', async () => {
    const user = await addMember(t.db, owner.workshopId, 'machinist');
    await call(resetPost, { body: { email: user.user.email } });
    const { token } = linkIn((await deliveredTo(user.user.email)).text, '/reset-password');
    await t.db.update(passwordResets).set({ expiresAt: Date.now() - 1 }).where(eq(passwordResets.userId, user.user.id));
    expect((await call(resetConfirm, { body: { token, password: 'a fine long passphrase' } })).status).toBe(404);
    expect((await call(resetConfirm, { body: { token: 'A'.repeat(43), password: 'a fine long passphrase' } })).status).toBe(404);
    expect((await call(resetConfirm, { body: { token: 'not-a-token', password: 'a fine long passphrase' } })).status).toBe(422);
  });
});
