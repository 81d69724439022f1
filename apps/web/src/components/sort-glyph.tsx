/** Up/down triangles of a sortable header; the active direction is solid. */
export function SortGlyph({ direction }: { direction: false | 'asc' | 'desc' }) {
  return (
    <svg viewBox="0 0 8 12" aria-hidden="true" className="h-3 w-2 shrink-0">
      <path d="M4 1 7 4.5H1Z" fill="currentColor" opacity={direction === 'asc' ? 1 : 0.25} />
      <path d="M4 11 1 7.5h6Z" fill="currentColor" opacity={direction === 'desc' ? 1 : 0.25} />
    </svg>
  );
}
