import type { Metadata } from 'next';
import { PlainBrand } from '@/components/share/PlainBrand';
import { SharedVerdict } from '@/components/share/SharedVerdict';
import { getDb } from '@/db/client';
import { openSharedReport } from '@/lib/services/share';
import { SharedReportClient } from './SharedReportClient';
import { AppError } from '@/lib/http/errors';
import { orNotFound } from '@/lib/http/not-found';
import { formatUtc } from '@/lib/dates';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Shared bed check', referrer: 'no-referrer', robots: { index: false, follow: false } };

/**
 * A shared report, read only, no account: /s/{token}. The same address with `Accept: application/json`
 * answers the JSON (next.config.mjs rewrites it to /api/shared/{token}). The page sends its frame and the
 * verdict and figures; the browser then loads the map and tables from that JSON, which counts the view. Lengths
 * are in the unit of `?units=` (mm or in, as the link was sent).
 */
export default async function SharedPage({ params, searchParams }: { params: Promise<{ token: string }>; searchParams: Promise<{ units?: string | string[] }> }) {
  const { token } = await params;
  // the unit the link was sent in (?units=in), else mm; the page's unit switch follows the same parameter
  const unit = (await searchParams).units === 'in' ? 'in' : 'mm';
  // unknown or tampered: the page answers 404; revoked or expired: this text, and 410 (set by proxy.ts)
  const view = await orNotFound(openSharedReport(await getDb(), token, { comments: false }).catch((e: unknown) => {
    if (e instanceof AppError && e.status === 410) return null;
    throw e;
  }));
  if (!view) return <SharedGone />;
  return (
    <div className="mx-auto flex min-h-dvh max-w-5xl flex-col gap-6 px-4 py-6">
      <header className="flex flex-wrap items-center justify-between gap-3 border-b-2 border-line pb-4">
        <PlainBrand />
        <span className="text-sm text-muted">A bed check shared with you · read only</span>
      </header>
      <article className="flex flex-col gap-6" data-testid="shared-report">
        <SharedVerdict bedName={view.bedName} checkTitle={view.checkTitle} checkedAt={view.checkedAt} report={view.report} unit={unit} photoNote={view.photoNote} />
        <SharedReportClient token={token} unit={unit} />
        <noscript><p className="text-lg">The deviation map, the tables and the comments need JavaScript; the PDF has the map, the positions out of tolerance and the comments: <a className="underline" href={`/api/shared/${token}/report.pdf`}>download the PDF</a>.</p></noscript>
      </article>
      <p className="text-sm text-muted">
        This link works until {formatUtc(view.expiresAt)} unless its owner revokes it sooner.
        Before anyone reaches onto the machine to act on this report: spindle stopped, machine switched off; the machine maker&apos;s manual and local rules come first.
      </p>
    </div>
  );
}

/** A link that was revoked or has expired (answered 410 Gone). */
function SharedGone() {
  return (
    <div className="mx-auto flex min-h-dvh max-w-xl flex-col gap-6 px-4 py-8">
      <PlainBrand />
      <section className="panel" data-testid="shared-gone">
        <h1 className="text-2xl font-bold">This link no longer opens the report</h1>
        <p className="mt-2">Whoever shared it has revoked it, or its time ran out. Ask them for a new link.</p>
      </section>
    </div>
  );
}
