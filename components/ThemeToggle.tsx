'use client';
/** Light / dark / device theme switch; the choice is kept in localStorage and set on <html data-theme>. */
import { useEffect, useState } from 'react';
import { THEME_STORAGE_KEY } from '@/lib/theme';

type Choice = 'light' | 'dark' | 'device';
const NEXT: Record<Choice, Choice> = { device: 'light', light: 'dark', dark: 'device' };
const LABEL: Record<Choice, string> = { device: 'Theme: device', light: 'Theme: light', dark: 'Theme: dark' };

export function ThemeToggle() {
  const [choice, setChoice] = useState<Choice>('device');
  useEffect(() => {
    const saved = localStorage.getItem(THEME_STORAGE_KEY);
    // eslint-disable-next-line react-hooks/set-state-in-effect -- read once after hydration
    if (saved === 'light' || saved === 'dark') setChoice(saved);
  }, []);
  const pick = () => {
    const next = NEXT[choice];
    setChoice(next);
    if (next === 'device') {
      localStorage.removeItem(THEME_STORAGE_KEY);
      document.documentElement.removeAttribute('data-theme');
    } else {
      localStorage.setItem(THEME_STORAGE_KEY, next);
      document.documentElement.setAttribute('data-theme', next);
    }
  };
  return (
    <button type="button" className="btn btn-quiet text-sm" onClick={pick} aria-label={`${LABEL[choice]}. Change theme`}>
      {LABEL[choice]}
    </button>
  );
}
