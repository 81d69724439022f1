import { BuildStatus } from '@earmark/contracts';
import { useEffect, useId, useState, type FormEvent } from 'react';
import { Button } from '@/components/button';
import { FieldLabel, Select, TextInput } from '@/components/form-controls';
import { verdictLabels } from '@/components/verdict-badge';
import { useDebouncedCallback } from '@/lib/use-debounced-callback';
import { hasBuildFilters, type BuildsSearch } from '../utils/builds-search';

export type BuildsFilterPatch = Partial<Pick<BuildsSearch, 'sha' | 'branch' | 'status' | 'target' | 'from' | 'to'>>;

const HEX = /^[0-9a-f]*$/;

/**
 * Filters of the builds table. Text fields apply once typing pauses (or on Enter); the
 * rest apply on change. Every change goes to the URL, which is the table's only state.
 */
export function BuildsFilters({
  search,
  targets,
  onChange,
  onClear,
}: {
  search: BuildsSearch;
  targets: Array<{ key: string; name: string }>;
  onChange: (patch: BuildsFilterPatch) => void;
  onClear: () => void;
}) {
  const ids = { sha: useId(), branch: useId(), status: useId(), target: useId(), from: useId(), to: useId(), hint: useId() };
  const [sha, setSha] = useState(search.sha ?? '');
  const [branch, setBranch] = useState(search.branch ?? '');
  // Back/forward and "Clear filters" change the URL under the inputs.
  useEffect(() => setSha(search.sha ?? ''), [search.sha]);
  useEffect(() => setBranch(search.branch ?? ''), [search.branch]);

  const shaValid = HEX.test(sha);
  const applyText = (next: { sha: string; branch: string }) => {
    if (!HEX.test(next.sha)) return;
    onChange({ sha: next.sha || undefined, branch: next.branch.trim() || undefined });
  };
  const applyLater = useDebouncedCallback(applyText, 350);

  const onSubmit = (event: FormEvent) => {
    event.preventDefault();
    applyText({ sha, branch });
  };

  return (
    <form role="search" aria-label="Filter builds" onSubmit={onSubmit} className="flex flex-wrap items-end gap-3">
      <div>
        <FieldLabel htmlFor={ids.sha}>Commit SHA</FieldLabel>
        <TextInput
          id={ids.sha}
          type="search"
          value={sha}
          placeholder="Prefix, e.g. 3f9a1c"
          spellCheck={false}
          autoComplete="off"
          aria-invalid={shaValid ? undefined : true}
          aria-describedby={shaValid ? undefined : ids.hint}
          className="w-44 font-mono"
          onChange={(event) => {
            const value = event.target.value.trim().toLowerCase();
            setSha(value);
            applyLater({ sha: value, branch });
          }}
        />
        {shaValid ? null : (
          <p id={ids.hint} className="absolute mt-1 text-xs text-fail">
            Hex digits only (0–9, a–f).
          </p>
        )}
      </div>
      <div>
        <FieldLabel htmlFor={ids.branch}>Branch</FieldLabel>
        <TextInput
          id={ids.branch}
          value={branch}
          placeholder="Any branch"
          spellCheck={false}
          autoComplete="off"
          className="w-40"
          onChange={(event) => {
            setBranch(event.target.value);
            applyLater({ sha, branch: event.target.value });
          }}
        />
      </div>
      <div>
        <FieldLabel htmlFor={ids.status}>Status</FieldLabel>
        <Select
          id={ids.status}
          value={search.status ?? ''}
          onChange={(event) => {
            const parsed = BuildStatus.safeParse(event.target.value);
            onChange({ status: parsed.success ? parsed.data : undefined });
          }}
        >
          <option value="">Any status</option>
          {BuildStatus.options.map((status) => (
            <option key={status} value={status}>
              {verdictLabels[status]}
            </option>
          ))}
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
      <div>
        <FieldLabel htmlFor={ids.from}>From</FieldLabel>
        <TextInput
          id={ids.from}
          type="date"
          value={search.from ?? ''}
          max={search.to}
          onChange={(event) => onChange({ from: event.target.value || undefined })}
        />
      </div>
      <div>
        <FieldLabel htmlFor={ids.to}>To</FieldLabel>
        <TextInput
          id={ids.to}
          type="date"
          value={search.to ?? ''}
          min={search.from}
          onChange={(event) => onChange({ to: event.target.value || undefined })}
        />
      </div>
      {hasBuildFilters(search) ? (
        <Button variant="ghost" onClick={onClear}>
          Clear filters
        </Button>
      ) : null}
      <button type="submit" className="sr-only">
        Apply filters
      </button>
    </form>
  );
}
