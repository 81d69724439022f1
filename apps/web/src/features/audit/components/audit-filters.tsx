import type { MemberRow } from '@earmark/contracts';
import { useId, useState } from 'react';
import { Button } from '@/components/button';
import { FieldLabel, Select, TextInput } from '@/components/form-controls';
import type { AuditSearch } from '../utils/audit-search';

const ENTITIES = ['mask', 'waiver', 'finding', 'test-case', 'target', 'token', 'member'] as const;
const ACTIONS = ['mask.', 'mask.draft', 'mask.update', 'mask.submit', 'mask.approve', 'mask.reject', 'mask.copy', 'waiver.', 'waiver.request', 'waiver.approve', 'waiver.reject', 'waiver.expire'];

export type AuditFilterPatch = Partial<Pick<AuditSearch, 'actor' | 'action' | 'entity'>>;

/** Actor and entity apply at once; the action (a name or a prefix ending in a dot) on Enter or Apply. */
export function AuditFilters({ search, members, onChange }: { search: AuditSearch; members: MemberRow[]; onChange: (patch: AuditFilterPatch) => void }) {
  const ids = useId();
  const [action, setAction] = useState(search.action ?? '');
  const filtered = Boolean(search.actor || search.action || search.entity);
  return (
    <form
      role="search"
      aria-label="Audit log filters"
      className="flex flex-wrap items-end gap-3"
      onSubmit={(e) => {
        e.preventDefault();
        onChange({ action: action.trim() || undefined });
      }}
    >
      <div>
        <FieldLabel htmlFor={`${ids}-actor`}>Actor</FieldLabel>
        <Select id={`${ids}-actor`} value={search.actor ?? ''} onChange={(e) => onChange({ actor: e.target.value || undefined })} className="w-64">
          <option value="">Anyone</option>
          {members.map((m) => (
            <option key={m.userId} value={`user:${m.email}`}>
              {m.displayName} ({m.email})
            </option>
          ))}
          {search.actor && !members.some((m) => `user:${m.email}` === search.actor) ? <option value={search.actor}>{search.actor}</option> : null}
        </Select>
      </div>
      <div>
        <FieldLabel htmlFor={`${ids}-action`}>Action</FieldLabel>
        <TextInput id={`${ids}-action`} list={`${ids}-actions`} value={action} onChange={(e) => setAction(e.target.value)} placeholder="e.g. mask.approve or waiver." className="w-56 font-mono" />
        <datalist id={`${ids}-actions`}>
          {ACTIONS.map((a) => (
            <option key={a} value={a} />
          ))}
        </datalist>
      </div>
      <div>
        <FieldLabel htmlFor={`${ids}-entity`}>Entity</FieldLabel>
        <Select id={`${ids}-entity`} value={search.entity ?? ''} onChange={(e) => onChange({ entity: e.target.value || undefined })} className="w-44">
          <option value="">Any</option>
          {ENTITIES.map((e) => (
            <option key={e} value={e}>
              {e}
            </option>
          ))}
          {search.entity && !(ENTITIES as readonly string[]).includes(search.entity) ? <option value={search.entity}>{search.entity}</option> : null}
        </Select>
      </div>
      <Button type="submit" variant="secondary">
        Apply
      </Button>
      {filtered ? (
        <Button
          variant="ghost"
          onClick={() => {
            setAction('');
            onChange({ actor: undefined, action: undefined, entity: undefined });
          }}
        >
          Clear filters
        </Button>
      ) : null}
    </form>
  );
}
