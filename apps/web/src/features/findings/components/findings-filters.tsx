import type { MemberRow } from '@earmark/contracts';
import { useId } from 'react';
import { Button } from '@/components/button';
import { FieldLabel, Select } from '@/components/form-controls';
import { findingStateLabels, findingStates } from '../utils/finding-states';
import { ANY_BRANCH, FindingsStateFilter, defaultFindingsSearch, type FindingsSearch } from '../utils/findings-search';

export type FindingsFilterPatch = Partial<Pick<FindingsSearch, 'state' | 'branch' | 'assignee' | 'testCase' | 'target'>>;

export function FindingsFilters({
  search,
  members,
  testCases,
  targets,
  branches,
  onChange,
}: {
  search: FindingsSearch;
  /** Branches with builds, main first. */
  branches: string[];
  members: MemberRow[];
  testCases: Array<{ key: string; name: string }>;
  targets: Array<{ key: string; name: string }>;
  onChange: (patch: FindingsFilterPatch) => void;
}) {
  const ids = { state: useId(), branch: useId(), assignee: useId(), testCase: useId(), target: useId() };
  const branch = search.branch ?? ANY_BRANCH;
  const branchOptions = [...new Set([defaultFindingsSearch.branch ?? ANY_BRANCH, ...branches, branch].filter((b) => b !== ANY_BRANCH))];
  const filtered =
    search.state !== defaultFindingsSearch.state ||
    branch !== defaultFindingsSearch.branch ||
    Boolean(search.assignee || search.testCase || search.target);
  return (
    <div role="search" aria-label="Filter findings" className="flex flex-wrap items-end gap-3">
      <div>
        <FieldLabel htmlFor={ids.state}>State</FieldLabel>
        <Select
          id={ids.state}
          value={search.state}
          onChange={(event) => {
            const parsed = FindingsStateFilter.safeParse(event.target.value);
            if (parsed.success) onChange({ state: parsed.data });
          }}
        >
          <option value="active">Active (open + investigating)</option>
          {findingStates.map((state) => (
            <option key={state} value={state}>
              {findingStateLabels[state]}
            </option>
          ))}
          <option value="all">Any state</option>
        </Select>
      </div>
      <div>
        <FieldLabel htmlFor={ids.branch}>Branch</FieldLabel>
        <Select id={ids.branch} value={branch} onChange={(event) => onChange({ branch: event.target.value })}>
          {branchOptions.map((name) => (
            <option key={name} value={name}>
              {name}
            </option>
          ))}
          <option value={ANY_BRANCH}>Any branch</option>
        </Select>
      </div>
      <div>
        <FieldLabel htmlFor={ids.assignee}>Assignee</FieldLabel>
        <Select id={ids.assignee} value={search.assignee ?? ''} onChange={(event) => onChange({ assignee: event.target.value || undefined })}>
          <option value="">Anyone</option>
          <option value="me">Me</option>
          <option value="none">Unassigned</option>
          {members.map((member) => (
            <option key={member.userId} value={member.userId}>
              {member.displayName}
            </option>
          ))}
        </Select>
      </div>
      <div>
        <FieldLabel htmlFor={ids.testCase}>Test case</FieldLabel>
        <Select id={ids.testCase} value={search.testCase ?? ''} onChange={(event) => onChange({ testCase: event.target.value || undefined })}>
          <option value="">Any test case</option>
          {testCases.map((testCase) => (
            <option key={testCase.key} value={testCase.key}>
              {testCase.key}
            </option>
          ))}
          {search.testCase && !testCases.some((t) => t.key === search.testCase) ? (
            <option value={search.testCase}>{search.testCase}</option>
          ) : null}
        </Select>
      </div>
      <div>
        <FieldLabel htmlFor={ids.target}>Target</FieldLabel>
        <Select id={ids.target} value={search.target ?? ''} onChange={(event) => onChange({ target: event.target.value || undefined })}>
          <option value="">Any target</option>
          {targets.map((target) => (
            <option key={target.key} value={target.key}>
              {target.name} ({target.key})
            </option>
          ))}
          {search.target && !targets.some((t) => t.key === search.target) ? <option value={search.target}>{search.target}</option> : null}
        </Select>
      </div>
      {filtered ? (
        <Button
          variant="ghost"
          onClick={() =>
            onChange({ state: defaultFindingsSearch.state, branch: defaultFindingsSearch.branch, assignee: undefined, testCase: undefined, target: undefined })
          }
        >
          Reset filters
        </Button>
      ) : null}
    </div>
  );
}
