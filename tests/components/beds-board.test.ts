/**
 * The dashboard's bed list is rendered on the server and hydrated in the browser: both must write the same text,
 * or React throws away the server's page (hydration error #418). The server and the browser run in different time
 * zones; here one process renders it twice, in two zones of the IANA tz database, with react-dom/server.
 */
import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { afterEach, describe, expect, it } from 'vitest';
import { BedsBoard } from '@/components/BedsBoard';
import type { BedDto } from '@/lib/services/beds';

const zone = process.env.TZ;
afterEach(() => { if (zone === undefined) delete process.env.TZ; else process.env.TZ = zone; });

// a check made late in the UTC evening: the next day already in Auckland (UTC+13 in December)
const checkedAt = Date.UTC(2026, 11, 9, 23, 30);
const bed: BedDto = {
  id: 'b1', name: 'Router bed', notes: null, createdAt: checkedAt - 86_400_000, updatedAt: null, presetId: null, patternRevision: null,
  patternId: null, pattern: null, lastCheck: { id: 'c1', status: 'done', verdict: 'pass', createdAt: checkedAt }, checkCount: 1,
};

function renderIn(tz: string): string {
  process.env.TZ = tz;
  const qc = new QueryClient({ defaultOptions: { queries: { retry: false, enabled: false } } });
  return renderToStaticMarkup(createElement(QueryClientProvider, { client: qc }, createElement(BedsBoard, { initialBeds: [bed], canCreate: false, presets: [] })));
}

describe('BedsBoard', () => {
  it('renders the same text on a server in UTC and a browser in Auckland, and says the time in UTC', () => {
    const server = renderIn('UTC');
    expect(renderIn('Pacific/Auckland')).toBe(server);
    expect(server).toContain('1 check, last 2026-12-09 23:30 UTC');
  });
});
