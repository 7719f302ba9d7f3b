'use client';
/**
 * The shared report's map, tables and comments, drawn in the browser from the JSON the same link answers
 * (`/api/shared/{token}`, which counts the view). The page itself sends only its frame and the verdict, so it
 * is quick to serve and paints at once; a chat app unfurling the link fetches the page only and is not counted
 * as a view.
 */
import dynamic from 'next/dynamic';
import { useQuery } from '@tanstack/react-query';
import { api, errorText } from '@/components/api';
import type { SharedReportData } from '@/components/share/SharedReport';
import type { LengthUnit } from '@/lib/report/units';

const SharedReport = dynamic(() => import('@/components/share/SharedReport').then((m) => m.SharedReport), {
  ssr: false,
  loading: () => <Loading />,
});

function Loading() {
  return <p className="text-muted" role="status">Loading the map and the tables…</p>;
}

export function SharedReportClient({ token, unit }: { token: string; unit: LengthUnit }) {
  const q = useQuery({
    queryKey: ['shared-report', token],
    queryFn: () => api<SharedReportData>(`/api/shared/${encodeURIComponent(token)}`),
    retry: 1,
    refetchOnWindowFocus: false,
  });
  if (q.isPending) return <Loading />;
  if (q.isError) {
    return <p className="field-error" role="alert">The map and the tables could not be loaded: {errorText(q.error)} Reload the page to try again.</p>;
  }
  return <SharedReport data={q.data} token={token} unit={unit} />;
}
