import { useEffect, useRef, type RefObject } from 'react';
import { useLocation } from 'react-router';

/** The fragment a link to one waiver card uses (`/approvals#waiver-<id>`); the id never shows as text. */
export const waiverAnchor = (id: string) => `waiver-${id}`;

/**
 * Whether the URL's fragment names this card; if so it is scrolled into view once it is
 * rendered (the router does not scroll to fragments of content that loads later).
 */
export function useLinkedCard(anchor: string): { ref: RefObject<HTMLElement | null>; current: boolean } {
  const { hash } = useLocation();
  const ref = useRef<HTMLElement | null>(null);
  const current = hash === `#${anchor}`;
  useEffect(() => {
    if (current) ref.current?.scrollIntoView?.({ block: 'start' });
  }, [current]);
  return { ref, current };
}
