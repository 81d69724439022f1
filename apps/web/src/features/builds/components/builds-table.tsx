import type { BuildSummary } from '@earmark/contracts';
import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  useReactTable,
  type SortingState,
  type Updater,
} from '@tanstack/react-table';
import { useMemo } from 'react';
import { useNavigate } from 'react-router';
import { RelativeTime } from '@/components/relative-time';
import { ShortSha } from '@/components/short-sha';
import { Skeleton } from '@/components/skeleton';
import { SortGlyph } from '@/components/sort-glyph';
import { VerdictBadge } from '@/components/verdict-badge';
import { cn } from '@/lib/cn';
import { paths } from '@/lib/paths';
import { sortToState, stateToSort, type BuildSort } from '../utils/builds-search';
import { VerdictCounts } from './verdict-counts';

const column = createColumnHelper<BuildSummary>();

/** Columns the API can sort by; the rest have plain headers. */
const sortable = new Set(['sha', 'branch', 'status', 'createdAt']);

function columnsFor(projectKey: string) {
  return [
    column.accessor('sha', {
      header: 'Build',
      cell: ({ row }) => (
        <div className="min-w-[120px] sm:min-w-[180px]">
          <ShortSha sha={row.original.sha} to={paths.build(projectKey, row.original.sha)} />
          {row.original.label ? <p className="mt-0.5 line-clamp-1 max-w-xs text-[13px] text-ink-600">{row.original.label}</p> : null}
        </div>
      ),
    }),
    // Status second, so a phone shows it without scrolling the table's frame sideways.
    column.accessor('status', { header: 'Status', cell: ({ getValue }) => <VerdictBadge verdict={getValue()} /> }),
    column.accessor('branch', {
      header: 'Branch',
      cell: ({ getValue }) => {
        const branch = getValue();
        return branch ? (
          <span className="inline-block max-w-[220px] truncate font-mono text-[12.5px] text-ink-800" title={branch}>
            {branch}
          </span>
        ) : (
          <span className="text-ink-400">—</span>
        );
      },
    }),
    column.accessor('counts', {
      header: 'Captures',
      enableSorting: false,
      cell: ({ getValue }) => <VerdictCounts counts={getValue()} />,
    }),
    column.accessor('createdAt', {
      header: 'Created',
      sortDescFirst: true,
      cell: ({ getValue }) => <RelativeTime iso={getValue()} className="text-ink-600" />,
    }),
  ];
}

/**
 * One page of builds as the API sorted and filtered it (TanStack Table in manual mode:
 * the URL holds the sort, the server applies it). A row opens its build; the SHA link is
 * the same target for keyboard users.
 */
export function BuildsTable({
  projectKey,
  builds,
  sort,
  onSortChange,
  busy,
}: {
  projectKey: string;
  builds: BuildSummary[];
  sort: BuildSort;
  onSortChange: (sort: BuildSort) => void;
  busy?: boolean;
}) {
  const navigate = useNavigate();
  // Stable per project: flexRender mounts cell renderers as components, so new ones would remount every cell.
  const columns = useMemo(() => columnsFor(projectKey), [projectKey]);
  const sorting: SortingState = [sortToState(sort)];
  const table = useReactTable({
    data: builds,
    columns,
    state: { sorting },
    manualSorting: true,
    manualPagination: true,
    enableSortingRemoval: false,
    enableMultiSort: false,
    onSortingChange: (updater: Updater<SortingState>) => {
      const next = typeof updater === 'function' ? updater(sorting) : updater;
      const first = next[0];
      const value = first ? stateToSort(first.id, first.desc) : null;
      if (value) onSortChange(value);
    },
    getCoreRowModel: getCoreRowModel(),
    getRowId: (build) => build.id,
  });

  return (
    <div className="relative overflow-x-auto rounded-lg border border-line bg-paper-raised shadow-[0_1px_0_rgb(0_0_0/0.03)]" aria-busy={busy || undefined}>
      <table className={cn('w-full min-w-[820px] border-collapse text-sm transition-opacity', busy && 'opacity-70')} aria-label="Builds">
        <thead>
          {table.getHeaderGroups().map((group) => (
            <tr key={group.id} className="border-b border-line">
              {group.headers.map((header) => {
                const sorted = header.column.getIsSorted();
                const canSort = sortable.has(header.column.id);
                return (
                  <th
                    key={header.id}
                    scope="col"
                    aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : undefined}
                    className="h-10 px-4 text-left text-xs font-semibold whitespace-nowrap uppercase tracking-[0.06em] text-ink-500"
                  >
                    {canSort ? (
                      <button
                        type="button"
                        onClick={header.column.getToggleSortingHandler()}
                        className={cn('inline-flex items-center gap-1.5 rounded uppercase hover:text-ink-900', sorted && 'text-ink-900')}
                      >
                        {flexRender(header.column.columnDef.header, header.getContext())}
                        <SortGlyph direction={sorted} />
                      </button>
                    ) : (
                      flexRender(header.column.columnDef.header, header.getContext())
                    )}
                  </th>
                );
              })}
            </tr>
          ))}
        </thead>
        <tbody>
          {table.getRowModel().rows.map((row) => (
            <tr
              key={row.id}
              data-sha={row.original.sha}
              onClick={(event) => {
                // Let links, buttons and text selection inside the row do their own thing.
                if (event.target instanceof Element && event.target.closest('a, button')) return;
                if (window.getSelection()?.toString()) return;
                void navigate(paths.build(projectKey, row.original.sha));
              }}
              className="cursor-pointer border-b border-line last:border-b-0 hover:bg-brass-50/60"
            >
              {row.getVisibleCells().map((cell) => (
                <td key={cell.id} className="px-4 py-3 align-middle">
                  {flexRender(cell.column.columnDef.cell, cell.getContext())}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

export function BuildsTableSkeleton() {
  return (
    <div className="rounded-lg border border-line bg-paper-raised" aria-hidden="true">
      <div className="h-10 border-b border-line" />
      {[0, 1, 2, 3, 4].map((row) => (
        <div key={row} className="flex items-center gap-8 border-b border-line px-4 py-4 last:border-b-0">
          <Skeleton className="h-4 w-28" />
          <Skeleton className="h-4 w-24" />
          <Skeleton className="h-6 w-16 rounded-full" />
          <Skeleton className="h-4 w-40" />
          <Skeleton className="ml-auto h-4 w-20" />
        </div>
      ))}
    </div>
  );
}
