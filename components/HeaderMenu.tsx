'use client';
/**
 * A disclosure for the header (a phone's menu, the account's drop-down): a native <details>, so it opens
 * without JavaScript; with it, the panel closes when the page changes, on Escape and on a click outside.
 */
import { usePathname } from 'next/navigation';
import { useEffect, useRef, type ReactNode } from 'react';

export function HeaderMenu({ label, summary, className = '', panelClassName = '', children }: {
  /** Accessible name of the toggle. */
  label: string;
  /** What the toggle shows. */
  summary: ReactNode;
  className?: string;
  panelClassName?: string;
  children: ReactNode;
}) {
  const ref = useRef<HTMLDetailsElement>(null);
  const pathname = usePathname();
  useEffect(() => {
    if (ref.current) ref.current.open = false;
  }, [pathname]);
  useEffect(() => {
    const close = (e: Event) => {
      const d = ref.current;
      if (!d?.open) return;
      if (e instanceof KeyboardEvent ? e.key === 'Escape' : !d.contains(e.target as Node)) d.open = false;
    };
    document.addEventListener('keydown', close);
    document.addEventListener('click', close);
    return () => {
      document.removeEventListener('keydown', close);
      document.removeEventListener('click', close);
    };
  }, []);
  return (
    <details ref={ref} className={`relative ${className}`}>
      <summary aria-label={label} className="btn btn-quiet list-none [&::-webkit-details-marker]:hidden">
        {summary}
      </summary>
      <div className={`absolute right-0 z-20 mt-2 flex min-w-60 flex-col gap-2 rounded-lg border border-line bg-card p-3 shadow-lg ${panelClassName}`}>
        {children}
      </div>
    </details>
  );
}
