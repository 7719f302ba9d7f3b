/**
 * Runs before routing (Next.js 16 "proxy", Node.js runtime). One job: a share link that was revoked or has
 * expired answers HTTP 410 Gone on its page /s/{token}, as its JSON does (app/api/shared/[token]). A page
 * cannot choose that status itself (Next only offers 404 from a page), so the status is set here and the page
 * (app/s/[token]/page.tsx) draws the "gone" text for the same state. Unknown tokens go on to the page's 404;
 * JSON requests to the same address are rewritten to the API by next.config.mjs and not touched here.
 */
import { NextResponse, type NextRequest } from 'next/server';
import { getDb } from '@/db/client';
import { shareLinkState } from '@/lib/services/share';

export async function proxy(request: NextRequest): Promise<NextResponse> {
  try {
    const token = decodeURIComponent(request.nextUrl.pathname.slice('/s/'.length));
    if ((await shareLinkState(await getDb(), token)) === 'gone') return NextResponse.next({ status: 410 });
  } catch {
    // a malformed address or a database that did not answer: the page reads it again and says what it finds
  }
  return NextResponse.next();
}

export const config = {
  matcher: [{ source: '/s/:token', missing: [{ type: 'header', key: 'accept', value: '(.*)application/json(.*)' }] }],
};
