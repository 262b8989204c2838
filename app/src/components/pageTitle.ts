/**
 * Every page names itself once: `usePageTitle('Projects')` sets the tab's title to
 * "Projects · Tetrawell" and, inside the app frame, the breadcrumb trail in the header
 * (by default just the page's own name; pass the way there for deeper pages).
 */
import { createContext, useContext, useEffect } from 'react';

export const APP_NAME = 'Tetrawell';

export interface Crumb {
  label: string;
  /** where the crumb leads; the last crumb (the page itself) has none */
  to?: string;
}

/** The tab title for a page: "<page> · Tetrawell", or the app's name alone. */
export function documentTitle(title: string | null | undefined): string {
  const t = title?.trim();
  return t ? `${t} · ${APP_NAME}` : APP_NAME;
}

/** Set by the app frame; pages call `usePageTitle` instead of using it directly. */
export const TrailContext = createContext<((trail: Crumb[]) => void) | null>(null);

export function usePageTitle(title: string | null | undefined, trail?: Crumb[]): void {
  const setTrail = useContext(TrailContext);
  useEffect(() => {
    const before = document.title;
    document.title = documentTitle(title);
    return () => {
      document.title = before;
    };
  }, [title]);
  // Compared by content, so pages may pass a fresh array on every render.
  const key = JSON.stringify(trail ?? (title ? [{ label: title }] : []));
  useEffect(() => {
    if (!setTrail) return;
    setTrail(JSON.parse(key) as Crumb[]);
    return () => setTrail([]);
  }, [key, setTrail]);
}
