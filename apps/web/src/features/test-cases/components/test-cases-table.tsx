import type { TestCaseDto } from '@earmark/contracts';
import { Link } from 'react-router';
import { Button } from '@/components/button';
import { RelativeTime } from '@/components/relative-time';
import { Skeleton } from '@/components/skeleton';
import { paths } from '@/lib/paths';
import { describeStimulus } from '../utils/test-case-form';
import { StimulusDownloadButton } from './stimulus-download';

/** A project's test cases by key; each row leads to its masks and offers its stimulus. */
export function TestCasesTable({
  projectKey,
  testCases,
  canConfigure,
  onEdit,
  cautionId,
}: {
  projectKey: string;
  testCases: TestCaseDto[];
  canConfigure: boolean;
  onEdit: (testCase: TestCaseDto) => void;
  /** The loudness caution shown above the table, which every download button points at. */
  cautionId: string;
}) {
  const sorted = [...testCases].sort((a, b) => a.key.localeCompare(b.key));
  return (
    <div className="overflow-x-auto rounded-lg border border-line bg-paper-raised">
      <table aria-label="Test cases" className="w-full min-w-[860px] border-collapse text-sm">
        <thead>
          <tr className="border-b border-line text-left text-xs font-semibold uppercase tracking-[0.06em] text-ink-500">
            <th scope="col" className="h-10 px-4">Key</th>
            <th scope="col" className="px-4">Name</th>
            <th scope="col" className="px-4">Stimulus</th>
            <th scope="col" className="px-4">Channels</th>
            <th scope="col" className="px-4">Updated</th>
            <th scope="col" className="px-4"><span className="sr-only">Actions</span></th>
          </tr>
        </thead>
        <tbody>
          {sorted.map((testCase) => (
            <tr key={testCase.key} className="border-b border-line align-top last:border-b-0 hover:bg-paper/60">
              <td className="px-4 py-3">
                <Link to={paths.masks(projectKey, testCase.key)} className="font-mono text-[13px] font-medium text-ink-950 underline-offset-2 hover:underline">
                  {testCase.key}
                </Link>
              </td>
              <td className="px-4 py-3">
                <span className="font-medium text-ink-900">{testCase.name}</span>
                {testCase.description ? <span className="mt-0.5 block max-w-xs truncate text-xs text-ink-500">{testCase.description}</span> : null}
              </td>
              <td className="px-4 py-3 text-ink-700">{describeStimulus(testCase.stimulus)}</td>
              <td className="px-4 py-3 font-mono text-xs text-ink-700">{testCase.channelMap.length ? testCase.channelMap.join(', ') : 'all'}</td>
              <td className="px-4 py-3 text-ink-600">
                <RelativeTime iso={testCase.updatedAt} />
              </td>
              <td className="px-4 py-2.5">
                <div className="flex items-start justify-end gap-2">
                  <Link
                    to={paths.masks(projectKey, testCase.key)}
                    className="inline-flex h-8 items-center rounded-md px-2.5 text-[13px] font-medium text-ink-700 hover:bg-ink-900/5"
                    aria-label={`Masks of ${testCase.key}`}
                  >
                    Masks
                  </Link>
                  {canConfigure ? (
                    <Button variant="ghost" className="h-8 px-2.5 text-[13px]" onClick={() => onEdit(testCase)} aria-label={`Edit ${testCase.key}`}>
                      Edit
                    </Button>
                  ) : null}
                  <StimulusDownloadButton projectKey={projectKey} caseKey={testCase.key} compact describedBy={cautionId} />
                </div>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

export function TestCasesTableSkeleton() {
  return (
    <div aria-busy="true" className="space-y-2 rounded-lg border border-line bg-paper-raised p-4">
      {Array.from({ length: 5 }, (_, i) => (
        <Skeleton key={i} className="h-8" />
      ))}
    </div>
  );
}
