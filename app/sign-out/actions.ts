'use server';
import { redirect } from 'next/navigation';
import { currentCookieData, endSession, setSessionCookieInAction } from '@/lib/auth/session';
import { action } from '@/lib/http/action';

const signOut = action({ auth: 'none' }, async ({ db }) => {
  await endSession(db, await currentCookieData());
  await setSessionCookieInAction(null);
});

/** Form action: revokes the session, clears the cookie and goes to the sign-in page. */
export async function signOutAndLeave(): Promise<void> {
  const result = await signOut();
  if (!result.ok) redirect(`/sign-out?error=${encodeURIComponent(result.error.code)}`);
  redirect('/sign-in?signed-out=1');
}
