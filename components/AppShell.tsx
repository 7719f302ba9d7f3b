/**
 * The frame of every signed-in page: brand, navigation, and the account (workshop, theme, sign-out). From 768 px
 * up the navigation is one row beside the brand and the account sits in a drop-down, so the header stays one
 * row at 1280 px; on a phone a single Menu button opens navigation and account together.
 */
import Link from 'next/link';
import type { ReactNode } from 'react';
import type { Auth } from '@/lib/auth/session';
import { isDemoMode } from '@/lib/auth/secret';
import { ROLE_LABELS } from '@/lib/services/actor';
import { HeaderMenu } from './HeaderMenu';
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

function navLinks(auth: Auth): { href: string; label: string }[] {
  const links = [
    { href: '/', label: 'Beds' },
    { href: '/members', label: 'Members' },
    { href: '/accessories', label: 'Accessories' },
    { href: '/guide', label: 'Photo guide' },
  ];
  if (auth.actor?.role === 'owner' && (process.env.NODE_ENV !== 'production' || isDemoMode())) links.push({ href: '/dev/outbox', label: 'Outbox' });
  return links;
}

function Account({ auth }: { auth: Auth }) {
  const actor = auth.actor;
  return (
    <>
      <p className="text-sm">
        <span className="font-bold">{auth.user.name}</span>
        {actor ? <span className="text-muted"> · {ROLE_LABELS[actor.role].name}</span> : null}
      </p>
      {actor && <WorkshopSwitch current={actor.workshopId} workshops={auth.workshops} />}
      <ThemeToggle />
      <SignOutButton className="btn btn-quiet w-full" />
    </>
  );
}

export function AppShell({ auth, children }: { auth: Auth; children: ReactNode }) {
  const links = navLinks(auth);
  const workshop = auth.workshops.find((w) => w.workshopId === auth.actor?.workshopId)?.name;
  const nav = (className: string) => (
    <nav aria-label="Main" className={className}>
      {links.map((l) => (
        <Link key={l.href} href={l.href} className="rounded-md px-3 py-2 font-bold no-underline hover:bg-idle-bg">
          {l.label}
        </Link>
      ))}
    </nav>
  );
  return (
    <div className="mx-auto flex min-h-dvh max-w-5xl flex-col px-4">
      <header className="flex items-center gap-4 border-b-2 border-line py-3" data-testid="app-header">
        <Brand />
        {nav('hidden flex-1 items-center gap-1 md:flex')}
        <HeaderMenu
          label="Account"
          className="ml-auto hidden md:block"
          summary={<span className="max-w-48 truncate text-sm">{workshop ?? auth.user.name} ▾</span>}
        >
          <Account auth={auth} />
        </HeaderMenu>
        <HeaderMenu label="Menu" className="ml-auto md:hidden" summary="Menu" panelClassName="w-[min(20rem,calc(100vw-2rem))]">
          {nav('flex flex-col')}
          <hr className="border-line" />
          <Account auth={auth} />
        </HeaderMenu>
      </header>
      <main className="min-w-0 flex-1 py-6">{children}</main>
      <footer className="border-t border-line py-4 text-sm text-muted">
        Gridproof measures from a photo; it does not replace a machine maker&apos;s checks. Machine off before you reach onto the bed.
      </footer>
    </div>
  );
}
