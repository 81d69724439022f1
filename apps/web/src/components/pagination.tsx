import { formatCount } from '@/lib/format';
import { Button } from './button';
import { Select } from './form-controls';

/** "26–50 of 212" with previous/next and a page-size choice; pages are 1-based. */
export function Pagination({
  page,
  pageSize,
  total,
  pageSizes = [25, 50, 100],
  onPageChange,
  onPageSizeChange,
  label,
}: {
  page: number;
  pageSize: number;
  total: number;
  pageSizes?: number[];
  onPageChange: (page: number) => void;
  onPageSizeChange?: (pageSize: number) => void;
  /** What is paged, for the navigation landmark ("Builds pages"). */
  label: string;
}) {
  const pageCount = Math.max(1, Math.ceil(total / pageSize));
  const first = total === 0 ? 0 : (page - 1) * pageSize + 1;
  const last = Math.min(total, page * pageSize);
  return (
    <nav aria-label={label} className="flex flex-wrap items-center justify-between gap-3 text-sm text-ink-600">
      <p aria-live="polite">
        <span className="font-mono tabular-nums text-ink-800">
          {formatCount(first)}–{formatCount(last)}
        </span>{' '}
        of <span className="font-mono tabular-nums text-ink-800">{formatCount(total)}</span>
      </p>
      <div className="flex items-center gap-2">
        {onPageSizeChange ? (
          <label className="flex items-center gap-2 text-xs text-ink-500">
            Per page
            <Select
              value={pageSize}
              onChange={(event) => onPageSizeChange(Number(event.target.value))}
              className="h-8 text-xs"
            >
              {(pageSizes.includes(pageSize) ? pageSizes : [...pageSizes, pageSize].sort((a, b) => a - b)).map((size) => (
                <option key={size} value={size}>
                  {size}
                </option>
              ))}
            </Select>
          </label>
        ) : null}
        <span className="px-1 text-xs">
          Page <span className="font-mono tabular-nums">{page}</span> of <span className="font-mono tabular-nums">{pageCount}</span>
        </span>
        <Button variant="secondary" className="h-8" disabled={page <= 1} onClick={() => onPageChange(page - 1)}>
          Previous
        </Button>
        <Button variant="secondary" className="h-8" disabled={page >= pageCount} onClick={() => onPageChange(page + 1)}>
          Next
        </Button>
      </div>
    </nav>
  );
}
