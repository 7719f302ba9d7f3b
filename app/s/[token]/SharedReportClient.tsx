'use client';
/**
 * The shared report, drawn in the browser only: the deviation map (one SVG mark per position) and the
 * positions table are the bulk of the page, and rendering them on the server for every opening cost most of
 * its time. The server sends the data (already stripped by lib/services/share-report.ts) and the page's frame.
 */
import dynamic from 'next/dynamic';
import type { SharedReportData } from '@/components/share/SharedReport';

const SharedReport = dynamic(() => import('@/components/share/SharedReport').then((m) => m.SharedReport), {
  ssr: false,
  loading: () => <p className="text-muted" role="status">Loading the report…</p>,
});

export function SharedReportClient({ data, token }: { data: SharedReportData; token: string }) {
  return <SharedReport data={data} token={token} />;
}
