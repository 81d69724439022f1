import { findingCheckName, type FindingRow } from '@earmark/contracts';
import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  useReactTable,
  type RowSelectionState,
} from '@tanstack/react-table';
import { useEffect, useRef, useState } from 'react';
import { Link } from 'react-router';
import { Button } from '@/components/button';
import { InlineError } from '@/components/inline-error';
import { MenuButton, type MenuOption } from '@/components/menu-button';
import { RelativeTime } from '@/components/relative-time';
import { ShortSha } from '@/components/short-sha';
import { Skeleton } from '@/components/skeleton';
import { cn } from '@/lib/cn';
import { describeMargin } from '@/lib/format-measure';
import { paths } from '@/lib/paths';
import { useBulkUpdateFindings } from '../api/bulk-update-findings';
import { useUpdateFinding } from '../api/update-finding';
import { findingStates } from '../utils/finding-states';
import { AssignMenu, AssigneeName, FindingStateLabel, StateMenu, UNASSIGNED, stateOptions } from './triage-controls';

const column = createColumnHelper<FindingRow>();

/**
 * What the cells need from the component. Passed as table meta so the column definitions
 * stay module-level constants: flexRender mounts each cell renderer as a component, and a
 * renderer recreated on every render would remount every cell (losing focus and open menus).
 */
type FindingsTableMeta = {
  projectKey: string;
  canTriage: boolean;
  assignees: MenuOption[];
  pendingId: string | null;
  onState: (finding: FindingRow, state: FindingRow['state']) => void;
  onAssign: (finding: FindingRow, assigneeId: string | null) => void;
  onOpenComments: (finding: FindingRow) => void;
};

function metaOf(table: { options: { meta?: unknown } }): FindingsTableMeta {
  return table.options.meta as FindingsTableMeta;
}

const columns = [
  column.display({
    id: 'select',
    header: ({ table }) => (
      <Checkbox
        label="Select all findings on this page"
        checked={table.getIsAllRowsSelected()}
        indeterminate={table.getIsSomeRowsSelected()}
        onChange={(checked) => table.toggleAllRowsSelected(checked)}
      />
    ),
    cell: ({ row }) => (
      <Checkbox label={`Select ${row.original.title}`} checked={row.getIsSelected()} onChange={(checked) => row.toggleSelected(checked)} />
    ),
  }),
  column.accessor('title', {
    header: 'Finding',
    cell: ({ row, table }) => (
      <div className="min-w-[140px] sm:min-w-[200px]">
        <Link
          to={paths.capture(metaOf(table).projectKey, row.original.buildSha, row.original.captureId)}
          className="font-medium text-ink-950 underline-offset-4 hover:underline"
          title={row.original.title}
        >
          {readableName(row.original)}
        </Link>
        <p className="mt-0.5 text-[11.5px] break-words text-ink-500">
          <span className="font-mono">
            {row.original.testCase} · {row.original.target}
          </span>
          {' · updated '}
          <RelativeTime iso={row.original.updatedAt} />
        </p>
      </div>
    ),
  }),
  // State right after the name: on a phone the frame shows both before it scrolls.
  column.accessor('state', {
    header: 'State',
    cell: ({ row, table }) => {
      const meta = metaOf(table);
      return meta.canTriage ? (
        <StateMenu
          finding={row.original}
          busy={meta.pendingId === row.original.id}
          onChange={(state) => meta.onState(row.original, state)}
        />
      ) : (
        <FindingStateLabel state={row.original.state} />
      );
    },
  }),
  column.accessor('margin', {
    header: 'Margin',
    cell: ({ row }) => (
      <span className="font-mono text-[12.5px] whitespace-nowrap tabular-nums text-ink-800">{describeMargin(row.original)}</span>
    ),
  }),
  // Since when and how often, from the finding's branch history: the current failing streak's first build
  // (or "passing now"), then how many builds failed and where it was first seen.
  column.accessor('failingSince', {
    header: 'History',
    cell: ({ row, table }) => {
      const { failingSince, firstSeen, occurrences, buildSha } = row.original;
      const projectKey = metaOf(table).projectKey;
      const first = firstSeen?.sha ?? buildSha;
      return (
        <div className="space-y-0.5 text-xs whitespace-nowrap text-ink-600">
          {failingSince ? (
            <p className="flex items-center gap-1" data-failing-since={failingSince.sha}>
              since <ShortSha sha={failingSince.sha} to={paths.build(projectKey, failingSince.sha)} />
            </p>
          ) : failingSince === null ? (
            <p className="text-pass">passing now</p>
          ) : null}
          <p className="flex items-center gap-1" data-occurrences={occurrences}>
            <span>
              <span className="font-mono tabular-nums text-ink-900">{occurrences ?? '—'}</span> {occurrences === 1 ? 'build' : 'builds'}, first
            </span>
            <ShortSha sha={first} to={paths.build(projectKey, first)} />
          </p>
        </div>
      );
    },
  }),
  column.accessor('branch', {
    header: 'Branch',
    cell: ({ getValue }) => {
      const branch = getValue();
      return branch ? (
        <span className="inline-block max-w-[140px] truncate font-mono text-[12.5px] text-ink-800" title={branch}>
          {branch}
        </span>
      ) : (
        <span className="text-ink-400">—</span>
      );
    },
  }),
  column.accessor('assignee', {
    header: 'Assignee',
    cell: ({ row, table }) => {
      const meta = metaOf(table);
      return (
        <div className="flex min-w-[170px] items-center justify-between gap-2">
          <AssigneeName finding={row.original} />
          {meta.canTriage ? (
            <AssignMenu
              finding={row.original}
              options={meta.assignees}
              busy={meta.pendingId === row.original.id}
              onAssign={(assigneeId) => meta.onAssign(row.original, assigneeId)}
            />
          ) : null}
        </div>
      );
    },
  }),
  column.accessor('commentCount', {
    header: 'Discussion',
    cell: ({ row, table }) => <CommentsButton finding={row.original} onOpen={() => metaOf(table).onOpenComments(row.original)} />,
  }),
];

/** The failing check in words, rendered from the row's fields (stored titles may carry old wording). */
function readableName(finding: FindingRow): string {
  return finding.checkKind === undefined ? finding.title : findingCheckName(finding);
}

function Checkbox({
  checked,
  indeterminate = false,
  onChange,
  label,
}: {
  checked: boolean;
  indeterminate?: boolean;
  onChange: (checked: boolean) => void;
  label: string;
}) {
  const ref = useRef<HTMLInputElement>(null);
  useEffect(() => {
    if (ref.current) ref.current.indeterminate = indeterminate;
  }, [indeterminate]);
  return (
    <input
      ref={ref}
      type="checkbox"
      aria-label={label}
      checked={checked}
      onChange={(event) => onChange(event.target.checked)}
      className="size-4 cursor-pointer accent-ink-900"
    />
  );
}

export function CommentsButton({ finding, onOpen }: { finding: FindingRow; onOpen: () => void }) {
  return (
    <button
      type="button"
      onClick={onOpen}
      className="inline-flex h-7 items-center gap-1.5 rounded-md px-2 text-xs font-medium text-ink-700 hover:bg-ink-900/5"
    >
      <svg viewBox="0 0 16 16" aria-hidden="true" className="size-3.5">
        <path d="M2.5 3.5h11v7h-6l-3 2.5v-2.5h-2Z" fill="none" stroke="currentColor" strokeWidth="1.3" strokeLinejoin="round" />
      </svg>
      Comments
      <span className="font-mono tabular-nums text-ink-500">{finding.commentCount}</span>
    </button>
  );
}

/**
 * The findings queue: each row links to its capture; engineers and above can assign,
 * change state and act on a selection of rows at once. Viewers get the same table without
 * any of those controls.
 */
export function FindingsTable({
  projectKey,
  findings,
  canTriage,
  assignees,
  onOpenComments,
  busy,
}: {
  projectKey: string;
  findings: FindingRow[];
  canTriage: boolean;
  assignees: MenuOption[];
  onOpenComments: (finding: FindingRow) => void;
  busy?: boolean;
}) {
  const [rowSelection, setRowSelection] = useState<RowSelectionState>({});
  const update = useUpdateFinding(projectKey);
  const bulk = useBulkUpdateFindings(projectKey);
  const pendingId = update.isPending ? update.variables.id : null;

  // A new page or filter shows other rows; a selection of rows no longer visible would surprise.
  const visibleIds = findings.map((finding) => finding.id).join(',');
  useEffect(() => setRowSelection({}), [visibleIds]);

  const meta: FindingsTableMeta = {
    projectKey,
    canTriage,
    assignees,
    pendingId,
    onState: (finding, state) => update.mutate({ id: finding.id, body: { state } }),
    onAssign: (finding, assigneeId) => update.mutate({ id: finding.id, body: { assigneeId } }),
    onOpenComments,
  };
  const table = useReactTable({
    data: findings,
    columns,
    meta,
    state: { rowSelection, columnVisibility: { select: canTriage } },
    enableRowSelection: canTriage,
    onRowSelectionChange: setRowSelection,
    getCoreRowModel: getCoreRowModel(),
    getRowId: (finding) => finding.id,
  });

  const selectedIds = table.getSelectedRowModel().rows.map((row) => row.original.id);
  const runBulk = (change: { state?: FindingRow['state']; assigneeId?: string | null }) =>
    bulk.mutate({ ids: selectedIds, ...change }, { onSuccess: () => setRowSelection({}) });

  return (
    <div className="space-y-3">
      {canTriage && selectedIds.length > 0 ? (
        <div
          role="region"
          aria-label="Bulk actions"
          className="flex flex-wrap items-center gap-3 rounded-lg border border-brass-300 bg-brass-50 px-4 py-2.5"
        >
          <p className="text-sm font-medium text-ink-900">
            <span className="font-mono tabular-nums">{selectedIds.length}</span> selected
          </p>
          <MenuButton
            label="Assign"
            menuLabel="Assign selected findings to"
            options={assignees}
            busy={bulk.isPending}
            onSelect={(value) => runBulk({ assigneeId: value === UNASSIGNED ? null : value })}
          />
          <MenuButton
            label="Set state"
            menuLabel="Set the state of selected findings"
            options={stateOptions}
            busy={bulk.isPending}
            onSelect={(value) => {
              const state = findingStates.find((candidate) => candidate === value);
              if (state) runBulk({ state });
            }}
          />
          <Button variant="ghost" className="h-8" onClick={() => setRowSelection({})}>
            Clear selection
          </Button>
        </div>
      ) : null}
      {update.error ? <InlineError error={update.error} /> : null}
      {bulk.error ? <InlineError error={bulk.error} /> : null}
      <div className="relative overflow-x-auto rounded-lg border border-line bg-paper-raised" aria-busy={busy || undefined}>
        <table aria-label="Findings" className={cn('w-full min-w-[900px] border-collapse text-sm', busy && 'opacity-70')}>
          <thead>
            {table.getHeaderGroups().map((group) => (
              <tr key={group.id} className="border-b border-line">
                {group.headers.map((header) => (
                  <th
                    key={header.id}
                    scope="col"
                    className={cn(
                      'h-10 px-3 text-left text-xs font-semibold whitespace-nowrap uppercase tracking-[0.06em] text-ink-500',
                      header.column.id === 'select' && 'w-10 pl-4',
                    )}
                  >
                    {flexRender(header.column.columnDef.header, header.getContext())}
                  </th>
                ))}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((row) => (
              <tr
                key={row.id}
                data-finding-id={row.original.id}
                className={cn('border-b border-line last:border-b-0', row.getIsSelected() ? 'bg-brass-50' : 'hover:bg-brass-50/50')}
              >
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className={cn('px-3 py-2.5 align-middle', cell.column.id === 'select' && 'pl-4')}>
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}

export function FindingsTableSkeleton() {
  return (
    <div className="rounded-lg border border-line bg-paper-raised" aria-hidden="true">
      <div className="h-10 border-b border-line" />
      {[0, 1, 2, 3].map((row) => (
        <div key={row} className="flex items-center gap-8 border-b border-line px-4 py-4 last:border-b-0">
          <span className="w-1/3 space-y-1.5">
            <Skeleton className="h-3.5 w-3/4" />
            <Skeleton className="h-3 w-1/2" />
          </span>
          <Skeleton className="h-4 w-28" />
          <Skeleton className="h-4 w-16" />
          <Skeleton className="ml-auto h-7 w-24" />
        </div>
      ))}
    </div>
  );
}
