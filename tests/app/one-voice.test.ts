/**
 * One check, four surfaces: the report page (rendered with react-dom/server from what its two API routes answer),
 * the PDF (its page content read back from the bytes, tests/pdf/pdf-reader.ts), the report mail (its HTML and
 * text as queued, and its inline map image decoded by sharp) and the share link (what the shared page renders
 * from the link's JSON). All four show the same verdict word and mark, the same headline, the same counts, the
 * same mark at each position, the same arrow scale and the same method note (how the tolerances were set). The counts are checked against the positions themselves
 * (a position not seen is one the photo could show; hidden ones are under the sheet, covered or cut).
 */
import { createElement, type ReactElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import sharp from 'sharp';
import { desc, eq } from 'drizzle-orm';
import { PDFDocument, StandardFonts } from 'pdf-lib';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { GET as detailGet } from '@/app/api/checks/[id]/detail/route';
import { GET as reportGet } from '@/app/api/checks/[id]/report/route';
import { GET as pdfGet } from '@/app/api/checks/[id]/report.pdf/route';
import { POST as sendPost } from '@/app/api/checks/[id]/send/route';
import { GET as sharedGet } from '@/app/api/shared/[token]/route';
import { ReportView, type CheckDetail } from '@/components/report/CheckReport';
import { SharedReport, type SharedReportData } from '@/components/share/SharedReport';
import { SharedVerdict } from '@/components/share/SharedVerdict';
import { outgoingMail, users } from '@/db/schema';
import { escapeHtml } from '@/lib/mail/html';
import { drawable } from '@/lib/pdf/text';
import { analyzePoints } from '@/lib/geometry/analyze';
import type { Report } from '@/lib/geometry/contract';
import { presetById } from '@/lib/geometry/presets';
import { makeScene } from '@/lib/geometry/synthetic';
import { patternToMm } from '@/lib/geometry/units';
import { withOutline } from '@/lib/report/map';
import { hexToRgb01, MARKS, POSITION_MARKS, type Mark } from '@/lib/report/palette';
import { BED_VERDICT_MARK, BED_VERDICT_WORD, MAP_EDGE_WORDS, MARK_WORD } from '@/lib/report/words';
import type { Actor } from '@/lib/services/actor';
import { finishedCheck } from '@/tests/services/share-fixtures';
import { call, newOwner, useFreshDatabase, type WebTestDb, sessionCookie } from '@/tests/web/helpers';
import { bounds, readPage, type PageContent } from '../pdf/pdf-reader';

const pattern = presetById('m8-100')!.size({ bedWidthMm: 1200, bedHeightMm: 800, stripWidthMm: 200 });

let t: WebTestDb;
let owner: Actor;
let cookie: string;
let checkId: string;
let stored: Report;

beforeAll(async () => {
  t = await useFreshDatabase();
  owner = await newOwner(t.db, 'One voice shop');
  cookie = await sessionCookie(t.db, owner);
  // panels shifted, one insert pushed well off, some holes not found, the reference square over a few
  const scene = makeScene({ pattern, seed: 5, panelShiftMm: 0.3, missingFraction: 0.06, extraDeviation: new Map([[7, [0.9, 0.2]]]), square: { sizeMm: 220, x: 300, y: 300, angleDeg: 4 } });
  // stored as the worker stores it: with the bed's outline
  stored = withOutline(analyzePoints(scene.points, pattern), patternToMm(pattern));
  ({ checkId } = await finishedCheck(t.db, owner, pattern, stored, { bedName: 'Voice bed', title: 'Tuesday' }));
});
afterAll(async () => { await t.close(); });

/** What every surface must agree on, from the positions themselves. */
function expected(r: Report) {
  const markOf = (p: Report['positions'][number]): Mark => (p.verdict === 'missing' && (p.hidden || p.outOfView) ? 'hidden' : p.verdict);
  const counts = Object.fromEntries(POSITION_MARKS.map((m) => [m, r.positions.filter((p) => markOf(p) === m).length])) as Record<Mark, number>;
  return { marks: r.positions.map((p) => [p.label, markOf(p)] as const), counts, measured: r.positions.filter((p) => p.deviation).length };
}

const unescape = (s: string) => s.replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&#x27;|&#39;/g, "'").replace(/&amp;/g, '&');
const byTestId = (html: string, id: string) => { const m = html.match(new RegExp(`data-testid="${id}"[^>]*>([\\s\\S]*?)</`)); return m ? unescape(m[1]!.replace(/<[^>]+>/g, '')) : null; };

/** What an HTML surface (the report page, the shared page) shows. */
function readHtml(html: string) {
  const verdictWord = byTestId(html, 'verdict-word');
  const headline = byTestId(html, 'verdict-sentence');
  const cards = Object.fromEntries([...html.matchAll(/<dt[^>]*>([^<]+)<\/dt><dd[^>]*>([^<]+)<\/dd>/g)].map((m) => [unescape(m[1]!), unescape(m[2]!)]));
  // the map's items: one group per position with its label and mark
  const marks = [...html.matchAll(/data-label="([^"]+)" data-mark="([a-z]+)"/g)].map((m) => [unescape(m[1]!), m[2] as Mark] as const);
  const legendHtml = html.match(/aria-label="Legend">([\s\S]*?)<\/div>/)?.[1] ?? '';
  const legend = Object.fromEntries([...legendHtml.matchAll(/<span class="inline-flex[^"]*" data-mark="([a-z]+)">[\s\S]*?<\/svg><span>([^<]+)<\/span>/g)].map((m) => [m[1], unescape(m[2]!)]));
  const arrows = byTestId(html, 'arrow-scale');
  const verdictMark = html.match(/aria-label="Verdict" data-verdict="[a-z]+" data-mark="([a-z]+)"/)?.[1];
  // the method note: its heading, then each list item and paragraph, in order
  const noteHtml = html.match(/data-testid="method-note"[^>]*>([\s\S]*?)<\/section>/)?.[1] ?? '';
  const method = [...noteHtml.matchAll(/<(h2|li|p)[^>]*>([\s\S]*?)<\/\1>/g)].map((m) => unescape(m[2]!.replace(/<[^>]+>/g, '')));
  // the map's switch between the whole bed and hole to hole (the report carries form verdicts)
  const mapView = html.includes('data-testid="map-view"');
  return { verdictWord, headline, cards, marks, legend, arrows, verdictMark, method, mapView };
}

function render(el: ReactElement): string {
  const qc = new QueryClient({ defaultOptions: { queries: { retry: false, enabled: false } } });
  return renderToStaticMarkup(createElement(QueryClientProvider, { client: qc }, el));
}

describe('one check on screen, as PDF, in the mail and through a share link', () => {
  it('shows the same marks, words, counts, arrow scale and method note on all four', async () => {
    // --- on screen: the report page from its API answers
    const report = (await call(reportGet, { cookie, params: { id: checkId } })).json as Report;
    const detail = (await call(detailGet, { cookie, params: { id: checkId } })).json as CheckDetail;
    expect(detail.units).toBe('mm');
    const webHtml = render(createElement(ReportView, { report, detail }));
    const web = readHtml(webHtml);

    // --- in the mail, which also makes the share link
    const sent = await call(sendPost, { cookie, body: { email: 'helper@voice.test' }, params: { id: checkId } });
    expect(sent.status).toBe(201);
    const [mail] = await t.db.select().from(outgoingMail).orderBy(desc(outgoingMail.createdAt)).limit(1);

    // --- through the share link: what the shared page renders from the link's JSON
    const url = new URL((sent.json as { link: { url: string } }).link.url);
    const token = url.pathname.split('/').pop()!;
    const data = (await call(sharedGet, { params: { token }, path: `/api/shared/${token}` })).json as SharedReportData;
    const sharedHtml = render(createElement('div', null,
      createElement(SharedVerdict, { bedName: data.bedName, checkTitle: data.checkTitle, checkedAt: data.checkedAt, report: data.report, unit: 'mm' }),
      createElement(SharedReport, { data, token, unit: 'mm' })));
    const shared = readHtml(sharedHtml);

    // --- as PDF, through its route
    const res = await pdfGet(new Request(`http://gridproof.test/api/checks/${checkId}/report.pdf`, { headers: { host: 'gridproof.test', cookie } }), { params: Promise.resolve({ id: checkId }) });
    expect(res.status).toBe(200);
    const bytes = new Uint8Array(await res.arrayBuffer());
    const n = (await PDFDocument.load(bytes)).getPageCount();
    const pages: PageContent[] = await Promise.all(Array.from({ length: n }, (_, k) => readPage(bytes, k)));
    const pdfText = pages.flatMap((p) => p.texts.map((x) => x.text)).join(' ');

    const want = expected(stored);
    expect(want.counts.out).toBeGreaterThan(0);
    expect(want.counts.missing).toBeGreaterThan(0);
    expect(want.counts.hidden).toBeGreaterThan(0);
    const word = BED_VERDICT_WORD[stored.summary.verdict];
    const headline = web.headline!;
    // in mm the headline is the measurement core's own sentence; on a page and in the PDF its opening verdict word
    // stands as the heading above it, so the line under it goes on without saying the word again
    const sentence = stored.summary.sentence;
    expect(sentence.startsWith(`${word}: `)).toBe(true);
    const rest = sentence.slice(word.length + 2);
    expect(headline).toBe(rest.charAt(0).toUpperCase() + rest.slice(1));
    // the headline counts what the cards count: the positions out, and those too close to call, on the whole bed
    // (one position "is", several "are": English subject–verb agreement)
    const are = (n: number) => (n === 1 ? 'is' : 'are');
    expect(want.counts.marginal).toBeGreaterThan(0);
    expect(headline).toContain(`${want.counts.out} of ${want.measured} measured positions ${are(want.counts.out)} out of tolerance on the bed as a whole`);
    expect(headline).toContain(`${want.counts.marginal} ${are(want.counts.marginal)} too close to the tolerance to call on the bed as a whole`);
    const counts = `${want.measured} · ${MARK_WORD.out} ${want.counts.out} · ${MARK_WORD.marginal} ${want.counts.marginal} · ${MARK_WORD.missing} ${want.counts.missing} · ${MARK_WORD.hidden} ${want.counts.hidden}`;
    const legend = Object.fromEntries(POSITION_MARKS.map((m) => [m, `${MARK_WORD[m]} ${want.counts[m]}`]));
    const scale = web.arrows!;
    expect(scale).toMatch(/^arrows × [\d,]+$/);

    // screen and share link
    for (const s of [web, shared]) {
      expect(s.verdictWord).toBe(word);
      expect(s.verdictMark).toBe(BED_VERDICT_MARK[stored.summary.verdict]);
      expect(s.headline).toBe(headline);
      expect(s.cards).toMatchObject({ Measured: String(want.measured), [MARK_WORD.out]: String(want.counts.out), [MARK_WORD.marginal]: String(want.counts.marginal), [MARK_WORD.missing]: String(want.counts.missing), [MARK_WORD.hidden]: String(want.counts.hidden) });
      expect(s.marks).toEqual(want.marks);
      expect(s.legend).toEqual(legend);
      expect(s.arrows).toBe(scale);
      expect(s.mapView).toBe(true);
    }

    // the method note, the same on all four: ISO 273 medium clearance for M8 is a 9.0 mm hole, so (9.0 − 8)/2 =
    // 0.50 mm radial; the band is √(−2 ln 0.05) ≈ 2.45 σ (the 95 % radius of a 2-D normal, Rayleigh law)
    const method = web.method;
    expect(method[0]).toBe('How the tolerances were set');
    expect(method[1]).toContain('M8 through a medium clearance hole of 9.00 mm (ISO 273), (hole − fastener)/2 = 0.50 mm');
    expect(method.at(-1)).toMatch(/\d+ of \d+ rows of the fit tables .* 2\.45 × the per-axis standard uncertainty σ\.$/);
    expect(shared.method).toEqual(method);
    const mailText = mail!.text.replace(/\s+/g, ' ');
    expect(mailText).toContain(`${method[0]}: ${method.slice(1).join(' ')}`);
    for (const line of method) expect(mail!.html).toContain(escapeHtml(line));
    // the PDF's standard Helvetica spells what it cannot encode in ASCII (− as -, σ as sigma)
    const helvetica = await (await PDFDocument.create()).embedFont(StandardFonts.Helvetica);
    expect(pdfText.replace(/\s+/g, ' ')).toContain(drawable(helvetica, method.join(' ')));
    expect(pdfText).not.toContain('?');

    // angles with their ± the same on the page and in the PDF: degrees to 0.001° with the degree sign after the
    // figure and after its ± (ISO 80000-3), the figure the stored one to that rounding
    const lat = stored.lattice;
    expect(lat.squarenessDeg).not.toBeNull();
    for (const [deg, sigma] of [[lat.squarenessDeg!, lat.uncertainty.squarenessDeg!], [lat.rotationDeg, lat.uncertainty.rotationDeg!]] as const) {
      // a figure that rounds to zero has no sign; a σ below 0.001° is said to be below it
      const value = `${Number(deg.toFixed(3)) < 0 ? '−' : Number(deg.toFixed(3)) > 0 ? '\\+?' : ''}${Math.abs(deg).toFixed(3).replace('.', '\\.')}`;
      const pm = Number(sigma.toFixed(3)) === 0 ? '< 0\\.001' : sigma.toFixed(3).replace('.', '\\.');
      const shown = unescape(webHtml).match(new RegExp(`${value}° ± ${pm}°`))?.[0];
      expect(shown, `${deg}° ± ${sigma}° on the page`).toBeDefined();
      expect(pdfText).toContain(drawable(helvetica, shown!));
    }

    // the mail: its words and counts, and its map
    expect(mail!.subject).toContain(`(${word.toLowerCase()})`);
    expect(mail!.text).toContain(`Verdict: ${sentence}`);
    expect(mail!.text).toContain(`Measured ${counts}`);
    // the mail's coloured verdict word is the headline's own opening word, not a second copy of it
    expect(mail!.html).toContain(`>${word}:</strong> ${escapeHtml(rest)}`);
    expect(mail!.html).toContain(`color:${MARKS[BED_VERDICT_MARK[stored.summary.verdict]].colour}`);
    const images = [...mail!.html!.matchAll(/src="data:image\/png;base64,([^"]+)"/g)].map((m) => Buffer.from(m[1]!, 'base64'));
    const map = images.find((b) => b.length > 2000)!;
    const { data: px, info } = await sharp(map).removeAlpha().raw().toBuffer({ resolveWithObject: true });
    expect(info.width).toBe(640);
    // the image is the drawing of the shared report's map: marks, legend and arrow scale read from its SVG
    const { renderDeviationMapSvg } = await import('@/lib/mail/map-image');
    const svg = renderDeviationMapSvg(data.report, { widthPx: 640 });
    const svgMarks = [...svg.matchAll(/<g transform="translate\(([\d.]+) ([\d.]+)\)" data-mark="([a-z]+)">/g)].map((m) => ({ x: Number(m[1]), y: Number(m[2]), mark: m[3] as Mark }));
    expect(svgMarks.slice(0, stored.positions.length).map((m, k) => [stored.positions[k]!.label, m.mark])).toEqual(want.marks);
    for (const m of POSITION_MARKS) expect(svg).toContain(`>${legend[m]}<`);
    expect(svg).toContain(scale);
    // and the decoded image shows each filled mark's colour at its centre (a ring's centre is the ground)
    const at = (x: number, y: number) => { const k = (Math.round(y) * info.width + Math.round(x)) * 3; return [px[k]!, px[k + 1]!, px[k + 2]!]; };
    const near = (a: number[], hex: string) => hexToRgb01(hex).every((v, j) => Math.abs(v * 255 - a[j]!) <= 24);
    for (const m of svgMarks.slice(0, stored.positions.length)) {
      if (MARKS[m.mark].shape === 'ring' || MARKS[m.mark].shape === 'plus') expect(near(at(m.x, m.y), MARKS[m.mark].colour)).toBe(false);
      else if (m.mark !== 'out') expect(near(at(m.x, m.y), MARKS[m.mark].colour), `${m.mark} at ${m.x},${m.y}`).toBe(true);
      // a crossed square's centre is its cross (ground): its colour is a little off the centre
      else expect(near(at(m.x + 3, m.y), MARKS.out.colour)).toBe(true);
    }

    // the PDF: words, counts, legend and arrow scale, and one mark of each position's colour on the map
    expect(pdfText).toContain(word);
    for (const w of headline.split(' ')) expect(pdfText).toContain(w);
    expect(pdfText).toContain(`Measured ${counts}`);
    for (const m of POSITION_MARKS) expect(pdfText).toContain(legend[m]);
    expect(pdfText).toContain(scale);
    const filled = pages[0]!.paths.filter((p) => p.fill && p.fillRgb && (({ minX, maxX, minY, maxY }) => maxX - minX < 20 && maxY - minY < 20)(bounds(p.subpaths.flat())));
    const ofColour = (hex: string) => filled.filter((p) => p.fillRgb!.every((v, j) => Math.abs(v - hexToRgb01(hex)[j]!) < 1e-3)).length;
    const verdictMark = BED_VERDICT_MARK[stored.summary.verdict];
    for (const m of ['in', 'marginal', 'out', 'hidden'] as const) {
      // each position's filled mark, one legend swatch, and the verdict's mark beside its word
      expect(ofColour(MARKS[m].colour), m).toBe(want.counts[m] + 1 + (m === verdictMark ? 1 : 0));
    }

    // the bed's edges named in the same words beside every map: the page's, the shared page's, each of the
    // PDF's maps (whole bed and hole to hole) and the mail's image
    const textsOf = (html: string) => [...html.matchAll(/<text[^>]*>([^<]*)<\/text>/g)].map((m) => unescape(m[1]!));
    const pdfMaps = pages.flatMap((p) => p.texts.map((x) => x.text));
    for (const words of [MAP_EDGE_WORDS.back, MAP_EDGE_WORDS.front]) {
      expect(textsOf(webHtml)).toContain(words);
      expect(textsOf(sharedHtml)).toContain(words);
      expect(textsOf(svg)).toContain(words);
      expect(pdfMaps.filter((s) => s === drawable(helvetica, words))).toHaveLength(2);
    }
    for (const s of [unescape(webHtml), unescape(sharedHtml), svg, pdfText]) expect(s).not.toMatch(/operator side/i);
  });

  it("writes the same headline and figures in inches on all four for a reader who works in inches", async () => {
    await t.db.update(users).set({ units: 'in' }).where(eq(users.id, owner.user.id));
    const report = (await call(reportGet, { cookie, params: { id: checkId } })).json as Report;
    const detail = (await call(detailGet, { cookie, params: { id: checkId } })).json as CheckDetail;
    expect(detail.units).toBe('in');
    const web = readHtml(render(createElement(ReportView, { report, detail })));
    const sent = await call(sendPost, { cookie, body: { email: 'inch-helper@voice.test' }, params: { id: checkId } });
    const [mail] = await t.db.select().from(outgoingMail).orderBy(desc(outgoingMail.createdAt)).limit(1);
    expect(mail!.toAddress).toBe('inch-helper@voice.test');
    // the link carries the sender's unit to the shared page
    const url = new URL((sent.json as { link: { url: string } }).link.url);
    expect(url.searchParams.get('units')).toBe('in');
    const token = url.pathname.split('/').pop()!;
    const data = (await call(sharedGet, { params: { token }, path: `/api/shared/${token}` })).json as SharedReportData;
    const shared = readHtml(render(createElement(SharedVerdict, { bedName: data.bedName, checkTitle: data.checkTitle, checkedAt: data.checkedAt, report: data.report, unit: 'in' })));
    const res = await pdfGet(new Request(`http://gridproof.test/api/checks/${checkId}/report.pdf`, { headers: { host: 'gridproof.test', cookie } }), { params: Promise.resolve({ id: checkId }) });
    const bytes = new Uint8Array(await res.arrayBuffer());
    const pdfText = (await readPage(bytes, 0)).texts.map((x) => x.text).join(' ');

    const headline = web.headline!;
    expect(headline).not.toMatch(/\bmm\b/);
    // the worst position out, in inches: its deviation over 25.4 mm (the international inch), four places
    const worst = stored.positions.filter((p) => p.verdict === 'out').sort((a, b) => b.deviation!.r - a.deviation!.r)[0]!;
    expect(headline).toContain(`${worst.label}, ${(worst.deviation!.r / 25.4).toFixed(4)} in off`);
    expect(shared.headline).toBe(headline);
    // the mail keeps the verdict word at the start of its line (lib/mail/templates.ts), the same words after it
    const word = BED_VERDICT_WORD[stored.summary.verdict];
    expect(mail!.text).toContain(`Verdict: ${word}: ${headline.charAt(0).toLowerCase()}${headline.slice(1)}`);
    for (const w of headline.split(' ')) expect(pdfText).toContain(w);
    const largest = `Largest ${(stored.summary.maxMm / 25.4).toFixed(4)} in`;
    expect(web.cards.Largest).toBe(largest.replace('Largest ', ''));
    expect(shared.cards.Largest).toBe(largest.replace('Largest ', ''));
    expect(mail!.text).toContain(largest);
    expect(pdfText).toContain(largest);
  });
});
