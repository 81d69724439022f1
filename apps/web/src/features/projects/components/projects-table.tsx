import type { Project } from '@earmark/contracts';
import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from '@tanstack/react-table';
import { useState } from 'react';
import { Link } from 'react-router';
import { RoleBadge } from '@/components/role-badge';
import { Skeleton } from '@/components/skeleton';
import { cn } from '@/lib/cn';
import { formatCount, formatDate } from '@/lib/format';
import { paths } from '@/lib/paths';

const roleRank: Record<Project['myRole'], number> = { viewer: 0, engineer: 1, qa_manager: 2, admin: 3 };

const column = createColumnHelper<Project>();

// Counts are right-aligned so digits line up by place value.
const numericColumns = new Set<string>(['targetCount', 'testCaseCount', 'buildCount']);

const countCell = (value: number) => (
  <span className={cn('font-mono tabular-nums', value === 0 ? 'text-ink-400' : 'text-ink-800')}>
    {formatCount(value)}
  </span>
);

const columns = [
  column.accessor('name', {
    header: 'Project',
    cell: ({ row }) => (
      <div className="min-w-[220px]">
        <Link
          to={paths.project(row.original.key)}
          className="font-medium text-ink-950 underline-offset-4 hover:underline focus-visible:underline"
        >
          {row.original.name}
        </Link>
        {row.original.description ? (
          <p className="mt-0.5 line-clamp-1 max-w-md text-[13px] text-ink-500">{row.original.description}</p>
        ) : null}
      </div>
    ),
  }),
  column.accessor('key', {
    header: 'Key',
    cell: ({ getValue }) => (
      <code className="rounded bg-ink-900/[0.05] px-1.5 py-0.5 font-mono text-[12.5px] whitespace-nowrap text-ink-800">{getValue()}</code>
    ),
  }),
  column.accessor('myRole', {
    header: 'Your role',
    sortingFn: (a, b) => roleRank[a.original.myRole] - roleRank[b.original.myRole],
    cell: ({ getValue }) => <RoleBadge role={getValue()} />,
  }),
  column.accessor('targetCount', { header: 'Targets', cell: ({ getValue }) => countCell(getValue()) }),
  column.accessor('testCaseCount', {
    header: 'Test cases',
    cell: ({ getValue }) => countCell(getValue()),
  }),
  column.accessor('buildCount', { header: 'Builds', cell: ({ getValue }) => countCell(getValue()) }),
  column.accessor('createdAt', {
    header: 'Created',
    cell: ({ getValue }) => (
      <time dateTime={getValue()} className="whitespace-nowrap text-ink-600">
        {formatDate(getValue())}
      </time>
    ),
  }),
];

function SortGlyph({ direction }: { direction: false | 'asc' | 'desc' }) {
  return (
    <svg viewBox="0 0 8 12" aria-hidden="true" className="h-3 w-2">
      <path d="M4 1 7 4.5H1Z" fill="currentColor" opacity={direction === 'asc' ? 1 : 0.25} />
      <path d="M4 11 1 7.5h6Z" fill="currentColor" opacity={direction === 'desc' ? 1 : 0.25} />
    </svg>
  );
}

export function ProjectsTable({ projects }: { projects: Project[] }) {
  const [sorting, setSorting] = useState<SortingState>([{ id: 'name', desc: false }]);
  const table = useReactTable({
    data: projects,
    columns,
    state: { sorting },
    onSortingChange: setSorting,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getRowId: (project) => project.key,
  });

  return (
    <div className="relative overflow-x-auto rounded-lg border border-line bg-paper-raised shadow-[0_1px_0_rgb(0_0_0/0.03)]">
      <table className="w-full min-w-[760px] border-collapse text-sm">
        <thead>
          {table.getHeaderGroups().map((group) => (
            <tr key={group.id} className="border-b border-line">
              {group.headers.map((header) => {
                const numeric = numericColumns.has(header.column.id);
                const sorted = header.column.getIsSorted();
                return (
                  <th
                    key={header.id}
                    scope="col"
                    aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : undefined}
                    className={cn(
                      'h-10 px-4 text-xs font-semibold whitespace-nowrap uppercase tracking-[0.06em] text-ink-500',
                      numeric ? 'text-right' : 'text-left',
                    )}
                  >
                    <button
                      type="button"
                      onClick={header.column.getToggleSortingHandler()}
                      className={cn(
                        'inline-flex items-center gap-1.5 rounded uppercase hover:text-ink-900',
                        numeric && 'flex-row-reverse',
                        sorted && 'text-ink-900',
                      )}
                    >
                      {flexRender(header.column.columnDef.header, header.getContext())}
                      <SortGlyph direction={sorted} />
                    </button>
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
              data-project-key={row.original.key}
              className="border-b border-line last:border-b-0 hover:bg-brass-50/60"
            >
              {row.getVisibleCells().map((cell) => (
                <td
                  key={cell.id}
                  className={cn(
                    'px-4 py-3 align-middle',
                    numericColumns.has(cell.column.id) ? 'text-right' : 'text-left',
                  )}
                >
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

export function ProjectsTableSkeleton() {
  return (
    <div className="rounded-lg border border-line bg-paper-raised" aria-hidden="true">
      <div className="h-10 border-b border-line" />
      {[0, 1, 2].map((row) => (
        <div key={row} className="flex items-center gap-6 border-b border-line px-4 py-4 last:border-b-0">
          <span className="w-1/4 space-y-1.5">
            <Skeleton className="h-3.5 w-2/3" />
            <Skeleton className="h-3 w-full" />
          </span>
          <Skeleton className="h-4 w-24" />
          <Skeleton className="h-4 w-16" />
          <Skeleton className="ml-auto h-4 w-40" />
        </div>
      ))}
    </div>
  );
}
