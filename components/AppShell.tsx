/** The frame of every signed-in page: brand, workshop, navigation, theme and sign-out. */
import Link from 'next/link';
import type { ReactNode } from 'react';
import type { Auth } from '@/lib/auth/session';
import { isDemoMode } from '@/lib/auth/secret';
import { ROLE_LABELS } from '@/lib/services/actor';
import { SignOutButton } from './SignOutButton';
import { ThemeToggle } from './ThemeToggle';
import { BrandMark } from './BrandMark';
import { WorkshopSwitch } from './WorkshopSwitch';

export function Brand() {
  return (
    <Link href="/" className="flex items-center gap-2 text-xl font-bold no-underline">
      <BrandMark />
      Gridproof
    </Link>
  );
}

export function AppShell({ auth, children }: { auth: Auth; children: ReactNode }) {
  const actor = auth.actor;
  return (
    <div className="mx-auto flex min-h-dvh max-w-5xl flex-col px-4">
      <header className="flex flex-wrap items-center gap-x-6 gap-y-3 border-b-2 border-line py-4">
        <Brand />
        {actor && <WorkshopSwitch current={actor.workshopId} workshops={auth.workshops} />}
        <nav aria-label="Main" className="flex flex-wrap gap-2">
          <Link href="/" className="btn btn-quiet">
            Beds
          </Link>
          <Link href="/members" className="btn btn-quiet">
            Members
          </Link>
          <Link href="/accessories" className="btn btn-quiet">
            Accessories
          </Link>
          <Link href="/guide" className="btn btn-quiet">
            Photo guide
          </Link>
          {actor?.role === 'owner' && (process.env.NODE_ENV !== 'production' || isDemoMode()) && (
            <Link href="/dev/outbox" className="btn btn-quiet">
              Outbox
            </Link>
          )}
        </nav>
        <div className="ml-auto flex flex-wrap items-center gap-2">
          <span className="text-muted text-sm">
            {auth.user.name}
            {actor ? ` · ${ROLE_LABELS[actor.role].name}` : ''}
          </span>
          <ThemeToggle />
          <SignOutButton />
        </div>
      </header>
      <main className="min-w-0 flex-1 py-6">{children}</main>
      <footer className="border-t border-line py-4 text-sm text-muted">
        Gridproof measures from a photo; it does not replace a machine maker&apos;s checks. Machine off before you reach onto the bed.
      </footer>
    </div>
  );
}
