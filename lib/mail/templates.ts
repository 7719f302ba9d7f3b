/**
 * The messages Gridproof sends: a report shared with a helper, a workshop invitation, a password reset. Each
 * has a plain-text and an HTML part, names the app and the sender's workshop, and escapes everything a user
 * typed. Inline images travel as `data:` URLs in the HTML; the transport turns them into `cid:` attachments.
 */
import { z } from 'zod';
import { ROLES, type Role } from '@/db/schema';
import { MARKS } from '@/lib/report/palette';
import { BED_VERDICT_MARK, BED_VERDICT_WORD } from '@/lib/report/words';
import { APP_NAME } from './config';
import { escapeHtml, escapeMultiline, oneLine, safeHttpUrl } from './html';
import { formatUtc } from '@/lib/dates';

/** A rendered message, ready for `enqueueMail`. */
export interface MailContent {
  subject: string;
  text: string;
  html: string;
}

export const MAIL_KINDS = ['report', 'invitation', 'password-reset'] as const;
export type MailKind = (typeof MAIL_KINDS)[number];

const when = z.union([z.date(), z.number().finite()]).transform((v) => (v instanceof Date ? v : new Date(v)));

function layout(opts: { title: string; workshopName: string | null; bodyHtml: string; footerHtml: string }): string {
  const workshop = opts.workshopName ? `<span style="color:#c9d3cf;font-weight:normal"> &middot; ${escapeHtml(opts.workshopName)}</span>` : '';
  return [
    '<!doctype html>',
    '<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width">',
    `<title>${escapeHtml(opts.title)}</title></head>`,
    '<body style="margin:0;padding:0;background:#eef1ef;font-family:Helvetica,Arial,sans-serif;color:#1d2422">',
    '<table role="presentation" width="100%" cellpadding="0" cellspacing="0" style="background:#eef1ef"><tr><td align="center" style="padding:24px 12px">',
    '<table role="presentation" width="600" cellpadding="0" cellspacing="0" style="max-width:600px;width:100%;background:#ffffff;border:1px solid #d5dcd9">',
    `<tr><td style="background:#23322e;color:#ffffff;padding:14px 20px;font-size:17px;font-weight:bold;letter-spacing:0.5px">${APP_NAME}${workshop}</td></tr>`,
    `<tr><td style="padding:20px;font-size:15px;line-height:1.5">${opts.bodyHtml}</td></tr>`,
    `<tr><td style="padding:12px 20px;border-top:1px solid #e3e8e6;font-size:12px;color:#5b6663">${opts.footerHtml}</td></tr>`,
    '</table></td></tr></table></body></html>',
  ].join('\n');
}

function button(href: string, label: string): string {
  return `<p style="margin:20px 0"><a href="${escapeHtml(href)}" style="display:inline-block;background:#2f6f5e;color:#ffffff;text-decoration:none;padding:10px 18px;border-radius:4px;font-weight:bold">${escapeHtml(label)}</a></p>`
    + `<p style="font-size:12px;color:#5b6663;word-break:break-all">Or open this address: ${escapeHtml(href)}</p>`;
}

// ---------------------------------------------------------------------------------------------------------
// Report shared with a helper

export const ReportMailInputSchema = z.object({
  workshopName: z.string().min(1).max(120),
  senderName: z.string().min(1).max(120),
  bedName: z.string().max(120).nullish(),
  checkTitle: z.string().max(200).nullish(),
  /** The shared report's URL (http or https). */
  linkUrl: z.string().url(),
  linkExpiresAt: when.nullish(),
  verdict: z.enum(['pass', 'marginal', 'fail']),
  /** The report's one-sentence verdict (report.summary.sentence). */
  verdictSentence: z.string().min(1).max(1000),
  /** The overall size and squareness line (report.summary.shapeSentence), when the report has one. */
  shapeSentence: z.string().max(1000).nullish(),
  /** The report's figures in one line, as its cards show them ("Measured 70 · Out 1 · …"). */
  figures: z.string().max(1000).nullish(),
  /**
   * The distances measured between positions given with the check, one sentence each (lib/report/distances.ts: given,
   * photo with the square alone, after the fit, residual), in the reader's unit.
   */
  distances: z.array(z.string().min(1).max(1000)).max(50).nullish(),
  /** The verdict's mark as a small image (PNG), shown before the verdict word. */
  verdictMark: z.custom<Uint8Array>((v) => v instanceof Uint8Array, 'the mark must be bytes (Buffer or Uint8Array)').nullish(),
  /** The report's method note (lib/report/method-note.ts): its heading and its lines, shown small at the end. */
  methodNote: z.object({ heading: z.string().min(1).max(200), lines: z.array(z.string().max(2000)).max(20) }).nullish(),
  /** A short note from the sender. */
  note: z.string().max(2000).nullish(),
  /** The deviation map, shown inline (PNG preferred: many mail readers do not show SVG). */
  map: z
    .object({
      content: z.custom<Uint8Array>((v) => v instanceof Uint8Array, 'the map must be bytes (Buffer or Uint8Array)'),
      contentType: z.enum(['image/png', 'image/svg+xml']),
      /** Alt text; defaults to a description of the map. */
      alt: z.string().max(200).optional(),
    })
    .nullish(),
});
export type ReportMailInput = z.input<typeof ReportMailInputSchema>;


/** A report sent to a helper: who sends it, the verdict, their note, the link, the deviation map inline. */
export function reportMail(input: ReportMailInput): MailContent {
  const i = ReportMailInputSchema.parse(input);
  const url = safeHttpUrl(i.linkUrl);
  const what = [i.bedName, i.checkTitle].filter((s): s is string => !!s && s.trim() !== '').join(' — ') || 'a bed check';
  const word = BED_VERDICT_WORD[i.verdict];
  const colour = MARKS[BED_VERDICT_MARK[i.verdict]].colour;
  const subject = oneLine(`${i.senderName} shared a bed check: ${what} (${word.toLowerCase()})`);
  // The sentence usually opens with the verdict itself; name it only when it does not.
  const verdictLine = /^(pass|passes|passed|marginal|fail|fails|failed)\b/i.test(i.verdictSentence.trim()) ? i.verdictSentence : `${word}. ${i.verdictSentence}`;
  // the HTML sets the verdict word in its colour: the sentence's own opening word when it has one ("Fail: …"), else
  // the word before it, so the word is never written twice
  const lead = new RegExp(`^\\s*${word}:\\s*`).exec(i.verdictSentence);
  const opening = lead ? { word: `${word}:`, rest: i.verdictSentence.slice(lead[0].length) } : { word: `${word}.`, rest: i.verdictSentence };
  const expires = i.linkExpiresAt ? `The link works until ${formatUtc(i.linkExpiresAt)}.` : '';

  const text = [
    `${i.senderName} of the workshop "${i.workshopName}" shared a ${APP_NAME} bed check with you: ${what}.`,
    '',
    `Verdict: ${verdictLine}`,
    ...(i.shapeSentence ? [i.shapeSentence] : []),
    ...(i.figures ? [i.figures] : []),
    ...(i.distances?.length ? ['', 'Measured distances:', ...i.distances.map((l) => `  ${l}`)] : []),
    ...(i.note && i.note.trim() ? ['', `Note from ${i.senderName}:`, ...i.note.trim().split(/\r?\n/).map((l) => `  ${l}`)] : []),
    '',
    'Open the report (no account needed; read only):',
    url,
    ...(expires ? [expires] : []),
    '',
    i.map ? 'The deviation map is attached as an image.' : '',
    ...(i.methodNote ? ['', `${i.methodNote.heading}:`, ...i.methodNote.lines.map((l) => `  ${l}`), ''] : []),
    '-- ',
    `${APP_NAME} checks CNC fixture beds from one photo. You get this message because ${i.senderName} entered your address; nothing else was shared with you.`,
  ].filter((l, k, all) => !(l === '' && all[k - 1] === '')).join('\n');

  const mapHtml = i.map
    ? `<p style="margin:16px 0 4px;font-weight:bold">Deviation map</p><img src="data:${i.map.contentType};base64,${Buffer.from(i.map.content).toString('base64')}" alt="${escapeHtml(i.map.alt ?? 'Map of the bed: each position marked by its verdict, with an arrow for how far it is from where it should be')}" style="max-width:100%;height:auto;border:1px solid #d5dcd9">`
    : '';
  const markImg = i.verdictMark
    ? `<img src="data:image/png;base64,${Buffer.from(i.verdictMark).toString('base64')}" alt="" width="16" height="16" style="vertical-align:-2px;margin-right:6px">`
    : '';
  const noteHtml = i.note && i.note.trim()
    ? `<p style="margin:16px 0 4px;font-weight:bold">Note from ${escapeHtml(i.senderName)}</p><blockquote style="margin:0;padding:8px 12px;border-left:3px solid #c9d3cf;background:#f6f8f7">${escapeMultiline(i.note.trim())}</blockquote>`
    : '';
  const bodyHtml = [
    `<p style="margin-top:0"><strong>${escapeHtml(i.senderName)}</strong> of the workshop <strong>${escapeHtml(i.workshopName)}</strong> shared a bed check with you: ${escapeHtml(what)}.</p>`,
    `<p style="padding:10px 12px;border-left:4px solid ${colour};background:#f6f8f7">${markImg}<strong style="color:${colour}">${escapeHtml(opening.word)}</strong> ${escapeHtml(opening.rest)}${i.shapeSentence ? `<br>${escapeHtml(i.shapeSentence)}` : ''}</p>`,
    i.figures ? `<p style="font-size:14px">${escapeHtml(i.figures)}</p>` : '',
    i.distances?.length
      ? `<p style="margin:12px 0 4px;font-size:14px;font-weight:bold">Measured distances</p><ul style="margin:0;padding-left:20px;font-size:14px">${i.distances.map((l) => `<li>${escapeHtml(l)}</li>`).join('')}</ul>`
      : '',
    noteHtml,
    button(url, 'Open the report'),
    expires ? `<p style="font-size:13px;color:#5b6663">${escapeHtml(expires)} No account is needed; the page is read only.</p>` : '<p style="font-size:13px;color:#5b6663">No account is needed; the page is read only.</p>',
    mapHtml,
    i.methodNote
      ? `<p style="margin:16px 0 4px;font-size:13px;font-weight:bold">${escapeHtml(i.methodNote.heading)}</p>${i.methodNote.lines.map((l) => `<p style="margin:0 0 4px;font-size:12px;color:#5b6663">${escapeHtml(l)}</p>`).join('')}`
      : '',
  ].join('\n');
  const html = layout({
    title: subject,
    workshopName: i.workshopName,
    bodyHtml,
    footerHtml: `${APP_NAME} checks CNC fixture beds from one photo. You get this message because ${escapeHtml(i.senderName)} entered your address; nothing else was shared with you.`,
  });
  return { subject, text, html };
}

// ---------------------------------------------------------------------------------------------------------
// Workshop invitation

const ROLE_DUTIES: Record<Role, string> = {
  owner: 'run the workshop: its members, beds, checks and settings',
  machinist: 'photograph beds, run checks, comment and share reports',
  reviewer: 'read the checks and comment on them',
};

export const InvitationMailInputSchema = z.object({
  workshopName: z.string().min(1).max(120),
  inviterName: z.string().min(1).max(120),
  role: z.enum(ROLES),
  /** The single-use accept link (http or https). */
  acceptUrl: z.string().url(),
  expiresAt: when,
});
export type InvitationMailInput = z.input<typeof InvitationMailInputSchema>;

/** An invitation to join a workshop with a role; the link works once and until it expires. */
export function invitationMail(input: InvitationMailInput): MailContent {
  const i = InvitationMailInputSchema.parse(input);
  const url = safeHttpUrl(i.acceptUrl);
  const subject = oneLine(`${i.inviterName} invites you to the workshop ${i.workshopName} on ${APP_NAME}`);
  const expires = formatUtc(i.expiresAt);
  const text = [
    `${i.inviterName} invites you to join the workshop "${i.workshopName}" on ${APP_NAME} as ${i.role}.`,
    `As ${i.role} you can ${ROLE_DUTIES[i.role]}.`,
    '',
    'Accept the invitation (you can sign in or create an account there):',
    url,
    '',
    `The link works once and until ${expires}. If you did not expect it, ignore this message: nothing happens without you.`,
    '-- ',
    `${APP_NAME} checks CNC fixture beds from one photo.`,
  ].join('\n');
  const bodyHtml = [
    `<p style="margin-top:0"><strong>${escapeHtml(i.inviterName)}</strong> invites you to join the workshop <strong>${escapeHtml(i.workshopName)}</strong> on ${APP_NAME} as <strong>${escapeHtml(i.role)}</strong>.</p>`,
    `<p>As ${escapeHtml(i.role)} you can ${escapeHtml(ROLE_DUTIES[i.role])}.</p>`,
    button(url, 'Accept the invitation'),
    `<p style="font-size:13px;color:#5b6663">The link works once and until ${escapeHtml(expires)}. If you did not expect it, ignore this message: nothing happens without you.</p>`,
  ].join('\n');
  return { subject, text, html: layout({ title: subject, workshopName: i.workshopName, bodyHtml, footerHtml: `${APP_NAME} checks CNC fixture beds from one photo.` }) };
}

// ---------------------------------------------------------------------------------------------------------
// Password reset

export const PasswordResetMailInputSchema = z.object({
  userName: z.string().min(1).max(120),
  /** The user's workshop, when they have one, so they recognise the message. */
  workshopName: z.string().max(120).nullish(),
  resetUrl: z.string().url(),
  expiresAt: when,
});
export type PasswordResetMailInput = z.input<typeof PasswordResetMailInputSchema>;

/** A password reset link, single use, short-lived. */
export function passwordResetMail(input: PasswordResetMailInput): MailContent {
  const i = PasswordResetMailInputSchema.parse(input);
  const url = safeHttpUrl(i.resetUrl);
  const subject = `Choose a new ${APP_NAME} password`;
  const expires = formatUtc(i.expiresAt);
  const ws = i.workshopName ? ` (workshop "${i.workshopName}")` : '';
  const text = [
    `Hello ${i.userName},`,
    '',
    `someone asked to reset the password of your ${APP_NAME} account${ws}. To choose a new one, open:`,
    url,
    '',
    `The link works once and until ${expires}. Choosing a new password signs you out everywhere else.`,
    'If you did not ask for this, ignore the message: your password stays as it is.',
    '-- ',
    `${APP_NAME} checks CNC fixture beds from one photo.`,
  ].join('\n');
  const bodyHtml = [
    `<p style="margin-top:0">Hello ${escapeHtml(i.userName)},</p>`,
    `<p>someone asked to reset the password of your ${APP_NAME} account${i.workshopName ? ` (workshop <strong>${escapeHtml(i.workshopName)}</strong>)` : ''}.</p>`,
    button(url, 'Choose a new password'),
    `<p style="font-size:13px;color:#5b6663">The link works once and until ${escapeHtml(expires)}. Choosing a new password signs you out everywhere else. If you did not ask for this, ignore the message: your password stays as it is.</p>`,
  ].join('\n');
  return { subject, text, html: layout({ title: subject, workshopName: i.workshopName ?? null, bodyHtml, footerHtml: `${APP_NAME} checks CNC fixture beds from one photo.` }) };
}
