/**
 * Templates and settings without a server: escaping of user-given text (& and < in text, quotes in attribute
 * values as the HTML standard's syntax requires, from memory; escaping all of & < > " ' ` is common practice),
 * refusal of non-http links, subject
 * lines free of CR/LF (a line break in a header field would start a new header, RFC 5322 §2.2), and the
 * validation of the SMTP environment.
 */
import { describe, expect, it } from 'vitest';
import { mailConfigFromEnv } from '@/lib/mail/config';
import { escapeHtml } from '@/lib/mail/html';
import { reportMailFromReport } from '@/lib/mail/compose';
import { headline } from '@/lib/report/headline';
import { invitationMail, passwordResetMail, reportMail } from '@/lib/mail/templates';
import { analyzePoints } from '@/lib/geometry/analyze';
import { ReportSchema } from '@/lib/geometry/contract';
import { presetById } from '@/lib/geometry/presets';
import { makeScene } from '@/lib/geometry/synthetic';
import { buildReport } from '../pdf/report-fixture';

const hostile = '<img src=x onerror="alert(1)">\'`&';

describe('mail templates', () => {
  it('escapes every user-given field in the HTML part and keeps it verbatim in the text part', () => {
    const m = reportMail({
      workshopName: hostile, senderName: hostile, bedName: hostile, checkTitle: 'ok', linkUrl: 'https://a.test/s/1',
      verdict: 'fail', verdictSentence: hostile, note: hostile,
    });
    expect(m.html).not.toContain('<img src=x');
    expect(m.html).toContain('&lt;img src=x onerror=&quot;alert(1)&quot;&gt;&#39;&#96;&amp;');
    expect(m.text).toContain(hostile);
    for (const mail of [
      invitationMail({ workshopName: hostile, inviterName: hostile, role: 'owner', acceptUrl: 'https://a.test/i/1', expiresAt: 0 }),
      passwordResetMail({ userName: hostile, workshopName: hostile, resetUrl: 'https://a.test/r/1', expiresAt: 0 }),
    ]) {
      expect(mail.html).not.toContain('<img src=x');
      expect(mail.html).toContain(escapeHtml(hostile));
    }
  });

  it('names the role and what it may do in an invitation for each role', () => {
    for (const role of ['owner', 'machinist', 'reviewer'] as const) {
      const m = invitationMail({ workshopName: 'W', inviterName: 'I', role, acceptUrl: 'https://a.test/i/1', expiresAt: 0 });
      expect(m.text).toContain(`as ${role}.`);
      expect(m.html).toContain(`<strong>${role}</strong>`);
      expect(m.text).toContain('1970-01-01 00:00 UTC');
    }
  });

  it('refuses links that are not http or https', () => {
    expect(() => reportMail({ workshopName: 'W', senderName: 'S', linkUrl: 'javascript:alert(1)', verdict: 'pass', verdictSentence: 'ok' })).toThrow(/http/);
    expect(() => passwordResetMail({ userName: 'U', resetUrl: 'data:text/html,hi', expiresAt: 0 })).toThrow(/http/);
  });

  it('keeps line breaks out of the subject', () => {
    const m = reportMail({ workshopName: 'W', senderName: 'Eve\r\nBcc: all@example.test', linkUrl: 'https://a.test/s/1', verdict: 'pass', verdictSentence: 'ok' });
    expect(m.subject).not.toMatch(/[\r\n]/);
    expect(m.subject.startsWith('Eve Bcc: all@example.test shared')).toBe(true);
  });

  it('attaches a map only when one is given', () => {
    const without = reportMail({ workshopName: 'W', senderName: 'S', linkUrl: 'https://a.test/s/1', verdict: 'pass', verdictSentence: 'ok' });
    expect(without.html).not.toContain('<img');
    const svg = Buffer.from('<svg xmlns="http://www.w3.org/2000/svg" width="4" height="4"/>');
    const withSvg = reportMail({ workshopName: 'W', senderName: 'S', linkUrl: 'https://a.test/s/1', verdict: 'pass', verdictSentence: 'ok', map: { content: svg, contentType: 'image/svg+xml' } });
    expect(withSvg.html).toContain(`src="data:image/svg+xml;base64,${svg.toString('base64')}"`);
  });
});

describe('report mail from a report', () => {
  it("writes the report's headline and figures in the sender's unit and inlines its map as PNG", async () => {
    const report = buildReport();
    const m = await reportMailFromReport({ report, workshopName: 'W', senderName: 'S', linkUrl: 'https://a.test/s/1' });
    expect(m.text).toContain(`Verdict: ${headline(report, 'mm')}`);
    expect(m.subject).toContain('(fail)');
    const worst = report.positions.filter((p) => p.verdict === 'out').sort((a, b) => b.deviation!.r - a.deviation!.r)[0]!;
    expect(m.text).toContain(`worst ${worst.label}, ${worst.deviation!.r.toFixed(2)} mm off`);
    // the cards' counts: positions measured, and the two not found (neither under the sheet nor outside the photo)
    expect(m.text).toContain(`Measured ${report.positions.filter((p) => p.deviation).length} · `);
    expect(m.text).toContain('Not seen 2 · Hidden 0');
    // 25.4 mm to the inch (exact by definition), four places for inches
    const inch = await reportMailFromReport({ report, units: 'in', workshopName: 'W', senderName: 'S', linkUrl: 'https://a.test/s/1' });
    expect(inch.text).toContain(`worst ${worst.label}, ${(worst.deviation!.r / 25.4).toFixed(4)} in off`);
    expect(inch.text).toContain(`Largest ${(report.summary.maxMm / 25.4).toFixed(4)} in`);
    expect(inch.text).not.toMatch(/\d mm\b/);
    // PNG signature 89 50 4E 47 0D 0A 1A 0A (ISO/IEC 15948 §5.2) is "iVBORw0KGgo" in base64.
    expect(m.html).toContain('src="data:image/png;base64,iVBORw0KGgo');
  });
});

describe('report mail with measured distances', () => {
  it("lists each distance given with the check, the photo's length and the residual, in the sender's unit, in the text and the HTML", async () => {
    const pattern = presetById('m8-100')!.size({ bedWidthMm: 1200, bedHeightMm: 800, stripWidthMm: 200 });
    const scene = makeScene({ pattern, seed: 5, centreNoisePx: 0.05 });
    // the preset's own 100 mm pitch: insert A1 to insert K1 is ten pitches, 1000 mm, given ± 0.3 mm as from a steel tape
    const report = ReportSchema.parse(analyzePoints(scene.points, pattern, { distances: [{ from: 'insert A1', to: 'insert K1', mm: 1000, sigmaMm: 0.3 }] }));
    const d = report.distances![0]!;
    expect(d.used).toBe(true);
    const mm = await reportMailFromReport({ report, workshopName: 'W', senderName: 'S', linkUrl: 'https://a.test/s/1' });
    const sentence = `Measured distance insert A1 to insert K1: given 1000.00 mm ± 0.30 mm; photo with the square alone ${d.squareMm!.toFixed(2)} mm, after the fit ${d.fittedMm!.toFixed(2)} mm; given − fit `;
    expect(mm.text).toContain('Measured distances:');
    expect(mm.text).toContain(sentence);
    expect(mm.text).toContain(`${Math.abs(d.residualSigmas!).toFixed(1)} times its uncertainty.`);
    expect(mm.html).toContain(escapeHtml(sentence));
    // 25.4 mm to the inch (exact by definition): 1000 mm = 39.3701 in, 0.3 mm = 0.0118 in
    const inch = await reportMailFromReport({ report, units: 'in', workshopName: 'W', senderName: 'S', linkUrl: 'https://a.test/s/1' });
    expect(inch.text).toContain(`given 39.3701 in ± 0.0118 in; photo with the square alone ${(d.squareMm! / 25.4).toFixed(4)} in, after the fit ${(d.fittedMm! / 25.4).toFixed(4)} in`);
    expect(inch.html).toContain('given 39.3701 in ± 0.0118 in');
    // a report without distances says nothing of them
    const none = await reportMailFromReport({ report: { ...report, distances: undefined }, workshopName: 'W', senderName: 'S', linkUrl: 'https://a.test/s/1' });
    expect(none.text).not.toContain('Measured distance');
    expect(none.html).not.toContain('Measured distance');
  });
});

describe('report mail with both verdicts', () => {
  it('carries the overall size and squareness line below the verdict, in the text and the HTML', () => {
    const line = 'Overall size and squareness: this reference cannot judge them to the tolerance; a larger reference target would settle it.';
    const m = reportMail({ workshopName: 'W', senderName: 'S', linkUrl: 'https://a.test/s/1', verdict: 'pass', verdictSentence: 'Pass: all 96 measured positions are within tolerance hole to hole.', shapeSentence: line });
    expect(m.text).toContain(line);
    expect(m.html).toContain(line);
    expect(m.text.indexOf(line)).toBeGreaterThan(m.text.indexOf('Verdict: '));
  });

  it('writes the verdict word once in the HTML when the sentence opens with it, and before it when it does not', () => {
    const opens = reportMail({ workshopName: 'W', senderName: 'S', linkUrl: 'https://a.test/s/1', verdict: 'fail', verdictSentence: 'Fail: 3 of 66 measured positions are out of tolerance.' });
    expect(opens.html).toContain('>Fail:</strong> 3 of 66 measured positions are out of tolerance.');
    expect(opens.html.match(/\bFail\b/g)).toHaveLength(1);
    const bare = reportMail({ workshopName: 'W', senderName: 'S', linkUrl: 'https://a.test/s/1', verdict: 'marginal', verdictSentence: 'two positions are too close to call.' });
    expect(bare.html).toContain('>Marginal.</strong> two positions are too close to call.');
  });
});

describe('mail settings from the environment', () => {
  it('uses the configured SMTP server, with 465 meaning TLS from the first byte', () => {
    const c = mailConfigFromEnv({ SMTP_HOST: 'smtp.example.test', SMTP_PORT: '465', SMTP_USER: 'u', SMTP_PASS: 'p', MAIL_FROM: 'Gridproof <g@example.test>' });
    expect(c).toMatchObject({ mode: 'smtp', host: 'smtp.example.test', port: 465, secure: true, auth: { user: 'u', pass: 'p' }, from: 'Gridproof <g@example.test>' });
    // Port 587 is mail submission with STARTTLS (RFC 6409); it is the default without SMTP_SECURE.
    expect(mailConfigFromEnv({ SMTP_HOST: 'smtp.example.test' })).toMatchObject({ port: 587, secure: false, auth: undefined });
  });

  it('falls back to the local development server outside production', () => {
    expect(mailConfigFromEnv({ NODE_ENV: 'development' })).toMatchObject({ mode: 'local', host: '127.0.0.1', port: 2525 });
    expect(mailConfigFromEnv({ LOCAL_SMTP_PORT: '2600' })).toMatchObject({ mode: 'local', port: 2600 });
  });

  it('names each bad variable', () => {
    expect(() => mailConfigFromEnv({ NODE_ENV: 'production' })).toThrow(/SMTP_HOST: SMTP_HOST is required in production/);
    expect(() => mailConfigFromEnv({ SMTP_HOST: 'h', SMTP_PORT: '70000' })).toThrow(/SMTP_PORT/);
    expect(() => mailConfigFromEnv({ SMTP_HOST: 'h', SMTP_USER: 'u' })).toThrow(/SMTP_USER and SMTP_PASS/);
    expect(() => mailConfigFromEnv({ SMTP_HOST: 'h', SMTP_SECURE: 'maybe' })).toThrow(/SMTP_SECURE/);
  });
});
