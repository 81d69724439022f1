import type { CheckKind } from '@earmark/contracts';
import { Fragment, useState } from 'react';
import { Button } from '@/components/button';
import { Select } from '@/components/form-controls';
import { cn } from '@/lib/cn';
import type { FieldIssues } from '@/lib/field-issues';
import { CHECK_KIND_LABELS, CHECK_KINDS, fieldUnit, freeId, KIND_FIELDS, move, optionLabel, starterCheck, type EditorCheck, type FieldSpec } from '../utils/editor-checks';
import { IssueText, SmallButton } from './editor-parts';
import { BandTable, LimitCurveTable } from './limit-curve-table';

const input =
  'h-8 rounded border border-line-strong bg-white px-2 text-[13px] text-ink-950 focus:border-ink-700 focus:outline-none focus:ring-3 focus:ring-brass-300/50 aria-invalid:border-fail read-only:border-transparent read-only:bg-transparent';

function FieldCell({
  spec,
  value,
  path,
  issues,
  checkNumber,
  readOnly,
  onChange,
}: {
  spec: Pick<FieldSpec, 'name' | 'label' | 'unit' | 'type' | 'options' | 'placeholder' | 'unitFromMetric'>;
  value: string;
  path: string;
  issues: FieldIssues;
  checkNumber: number;
  readOnly: boolean;
  onChange: (value: string) => void;
}) {
  const messages = issues[path] ?? [];
  const name = `${spec.label}${spec.unit ? ` (${spec.unit})` : ''} of check ${checkNumber}`;
  const numeric = spec.type === 'number';
  if (readOnly) {
    // Read-only values are text, never a fixed-width input, so a long value is never cut off.
    const shown = spec.type === 'select' ? optionLabel(spec, value) : value;
    return (
      <div className="flex min-w-0 flex-col gap-0.5" role="group" aria-label={name}>
        <span className="text-[11px] text-ink-500">
          {spec.label}
          {spec.unit ? <span className="ml-1 font-mono">{spec.unit}</span> : null}
        </span>
        <span data-field={spec.name} className={cn('min-h-8 py-1.5 text-[13px] break-words text-ink-950', numeric && 'font-mono tabular-nums', !shown && 'text-ink-400')}>
          {shown || (spec.placeholder === 'auto' ? 'auto' : '—')}
        </span>
      </div>
    );
  }
  return (
    <label className="flex min-w-0 flex-col gap-0.5">
      <span className="text-[11px] text-ink-500">
        {spec.label}
        {spec.unit ? <span className="ml-1 font-mono">{spec.unit}</span> : null}
      </span>
      {spec.type === 'select' ? (
        <select aria-label={name} aria-invalid={messages.length ? true : undefined} className={cn(input, 'pr-6')} value={value} onChange={(e) => onChange(e.target.value)}>
          {spec.options?.some((o) => o.value === '') ? null : <option value="">—</option>}
          {/* A stored value the list no longer offers (the engine self-test) stays visible, so its cell can say why it must go. */}
          {value && !spec.options?.some((o) => o.value === value) ? <option value={value}>{optionLabel(spec, value)}</option> : null}
          {spec.options?.map((o) => (
            <option key={o.value} value={o.value}>
              {o.label}
            </option>
          ))}
        </select>
      ) : (
        <input
          aria-label={name}
          aria-invalid={messages.length ? true : undefined}
          readOnly={readOnly}
          inputMode={numeric ? 'decimal' : 'text'}
          placeholder={readOnly ? undefined : spec.placeholder}
          className={cn(input, numeric ? 'w-24 text-right font-mono tabular-nums' : spec.type === 'text' ? 'w-40' : 'w-28 font-mono')}
          value={value}
          onChange={(e) => onChange(e.target.value)}
        />
      )}
      <IssueText path={path} messages={messages} />
    </label>
  );
}

/** Schema path of an editor field: tuple parts (`bandHz.0`) report on the tuple as well. */
function fieldIssues(issues: FieldIssues, base: string, name: string): FieldIssues {
  const [head] = name.split('.');
  const own = issues[`${base}.${name}`] ?? [];
  const tuple = name.endsWith('.0') && head ? (issues[`${base}.${head}`] ?? []) : [];
  return { [`${base}.${name}`]: [...tuple, ...own] };
}

/**
 * The draft's checks as a table: one row per check (order, id, kind, settings), with a
 * second row for limit curves and bands. Moving, adding and removing rows keeps focus
 * usable by keyboard; every schema message sits under the cell its path names.
 */
export function ChecksEditor({
  checks,
  issues,
  readOnly,
  onChange,
  selectedUid,
  onSelect,
}: {
  checks: EditorCheck[];
  issues: FieldIssues;
  readOnly: boolean;
  onChange: (checks: EditorCheck[]) => void;
  /** The magnitude envelope shown in the preview. */
  selectedUid?: string | null;
  onSelect?: (uid: string) => void;
}) {
  const [newKind, setNewKind] = useState<CheckKind>('magnitude-envelope');
  const update = (index: number, patch: (check: EditorCheck) => EditorCheck) => onChange(checks.map((c, i) => (i === index ? patch(c) : c)));
  const setField = (index: number, name: string, value: string) => update(index, (c) => ({ ...c, fields: { ...c.fields, [name]: value } }));

  return (
    <div className="space-y-3">
      <div className="relative overflow-x-auto rounded-lg border border-line bg-paper-raised">
        <table aria-label="Checks editor" className="w-full min-w-[880px] border-collapse text-sm">
          <thead>
            <tr className="border-b border-line text-left text-xs font-semibold uppercase tracking-[0.06em] text-ink-500">
              <th scope="col" className="h-10 w-12 px-3">#</th>
              <th scope="col" className="px-3">Check</th>
              <th scope="col" className="px-3">Settings</th>
              <th scope="col" className="w-32 px-3 text-right">
                <span className={readOnly ? 'sr-only' : undefined}>Order</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {checks.map((check, index) => {
              const base = `checks.${index}`;
              const number = index + 1;
              const hasTables = check.kind === 'magnitude-envelope' || check.kind === 'band-levels' || check.kind === 'distortion-vs-frequency';
              const rowLevel = [...(issues[base] ?? []), ...(issues[`${base}.kind`] ?? [])];
              const selected = selectedUid === check.uid;
              return (
                <Fragment key={check.uid}>
                  <tr className={cn('align-top', hasTables ? '' : 'border-b border-line', selected && 'bg-brass-50/60')} data-check-row={check.fields.id}>
                    <td className="px-3 py-3 font-mono text-xs text-ink-500">{number}</td>
                    <td className="px-3 py-2.5">
                      <div className="flex flex-col gap-1.5">
                        <span className="inline-flex w-fit items-center rounded-[5px] border border-line-strong px-1.5 text-[11px] font-semibold uppercase tracking-[0.05em] text-ink-700">
                          {CHECK_KIND_LABELS[check.kind]}
                        </span>
                        <FieldCell
                          spec={{ name: 'id', label: 'Id', type: 'text' }}
                          value={check.fields.id ?? ''}
                          path={`${base}.id`}
                          issues={issues}
                          checkNumber={number}
                          readOnly={readOnly}
                          onChange={(v) => setField(index, 'id', v)}
                        />
                        <FieldCell
                          spec={{ name: 'label', label: 'Label', type: 'text', placeholder: 'optional' }}
                          value={check.fields.label ?? ''}
                          path={`${base}.label`}
                          issues={issues}
                          checkNumber={number}
                          readOnly={readOnly}
                          onChange={(v) => setField(index, 'label', v)}
                        />
                        <IssueText path={base} messages={rowLevel} />
                      </div>
                    </td>
                    <td className="px-3 py-2.5">
                      <div className="flex flex-wrap gap-x-3 gap-y-2">
                        {KIND_FIELDS[check.kind].map((spec) => (
                          <FieldCell
                            key={spec.name}
                            spec={{ ...spec, unit: fieldUnit(spec, check) }}
                            value={check.fields[spec.name] ?? ''}
                            path={`${base}.${spec.name}`}
                            issues={fieldIssues(issues, base, spec.name)}
                            checkNumber={number}
                            readOnly={readOnly}
                            onChange={(v) => setField(index, spec.name, v)}
                          />
                        ))}
                        <FieldCell
                          spec={{ name: 'channels', label: 'Channels', type: 'list', placeholder: 'all' }}
                          value={check.fields.channels ?? ''}
                          path={`${base}.channels`}
                          issues={{ [`${base}.channels`]: Object.entries(issues).filter(([p]) => p === `${base}.channels` || p.startsWith(`${base}.channels.`)).flatMap(([, m]) => m) }}
                          checkNumber={number}
                          readOnly={readOnly}
                          onChange={(v) => setField(index, 'channels', v)}
                        />
                      </div>
                    </td>
                    <td className="px-3 py-2.5">
                      <div className="flex justify-end gap-0.5">
                        {check.kind === 'magnitude-envelope' && onSelect ? (
                          <SmallButton label={`Preview check ${number}`} onClick={() => onSelect(check.uid)}>
                            <path d="M1.5 8s2.5-4.5 6.5-4.5S14.5 8 14.5 8 12 12.5 8 12.5 1.5 8 1.5 8Z" />
                            <circle cx="8" cy="8" r="1.8" />
                          </SmallButton>
                        ) : null}
                        {readOnly ? null : (
                          <>
                            <SmallButton label={`Move check ${number} up`} disabled={index === 0} onClick={() => onChange(move(checks, index, index - 1))}>
                              <path d="M8 12.5v-9m0 0-3.5 3.5M8 3.5l3.5 3.5" />
                            </SmallButton>
                            <SmallButton label={`Move check ${number} down`} disabled={index === checks.length - 1} onClick={() => onChange(move(checks, index, index + 1))}>
                              <path d="M8 3.5v9m0 0-3.5-3.5M8 12.5l3.5-3.5" />
                            </SmallButton>
                            <SmallButton label={`Remove check ${number}`} onClick={() => onChange(checks.filter((_, i) => i !== index))}>
                              <path d="M3 4.5h10M6.5 4.5V3h3v1.5M4.5 4.5l.6 8.5h5.8l.6-8.5" />
                            </SmallButton>
                          </>
                        )}
                      </div>
                    </td>
                  </tr>
                  {hasTables ? (
                    <tr className={cn('border-b border-line', selected && 'bg-brass-50/60')}>
                      <td />
                      <td colSpan={3} className="px-3 pb-3">
                        {check.kind === 'magnitude-envelope' ? (
                          <div className="grid gap-6 sm:grid-cols-2">
                            {(['upper', 'lower'] as const).map((side) => {
                              const rows = check[side];
                              const title = side === 'upper' ? 'Upper limit' : 'Lower limit';
                              if (!rows) {
                                return readOnly ? (
                                  <p key={side} className="text-xs text-ink-500">No {title.toLowerCase()}.</p>
                                ) : (
                                  <div key={side}>
                                    <Button
                                      variant="secondary"
                                      className="h-8 text-[13px]"
                                      onClick={() => update(index, (c) => ({ ...c, [side]: [{ hz: '20', db: side === 'upper' ? '1' : '-1' }, { hz: '20000', db: side === 'upper' ? '1' : '-1' }] }))}
                                    >
                                      Add {title.toLowerCase()} to check {number}
                                    </Button>
                                    <IssueText path={`${base}.${side}`} messages={issues[`${base}.${side}`] ?? []} />
                                  </div>
                                );
                              }
                              return (
                                <div key={side}>
                                  <LimitCurveTable
                                    title={`${title} of check ${number}`}
                                    rows={rows}
                                    path={`${base}.${side}`}
                                    issues={issues}
                                    readOnly={readOnly}
                                    onChange={(next) => update(index, (c) => ({ ...c, [side]: next }))}
                                  />
                                  {readOnly ? null : (
                                    <button
                                      type="button"
                                      className="mt-1 ml-3 text-xs font-medium text-ink-500 underline-offset-2 hover:text-fail hover:underline"
                                      onClick={() => update(index, (c) => ({ ...c, [side]: null }))}
                                    >
                                      Drop {title.toLowerCase()}
                                    </button>
                                  )}
                                </div>
                              );
                            })}
                          </div>
                        ) : check.kind === 'distortion-vs-frequency' ? (
                          <LimitCurveTable
                            title={`Upper limit of check ${number} (dB re fundamental)`}
                            rows={check.upper ?? []}
                            path={`${base}.max`}
                            issues={issues}
                            readOnly={readOnly}
                            onChange={(next) => update(index, (c) => ({ ...c, upper: next }))}
                          />
                        ) : (
                          <BandTable
                            rows={check.bands}
                            path={`${base}.bands`}
                            issues={issues}
                            readOnly={readOnly}
                            onChange={(next) => update(index, (c) => ({ ...c, bands: next }))}
                          />
                        )}
                      </td>
                    </tr>
                  ) : null}
                </Fragment>
              );
            })}
          </tbody>
        </table>
        {checks.length === 0 ? <p className="px-4 py-6 text-center text-sm text-ink-600">This draft has no checks yet. A mask needs at least one.</p> : null}
      </div>
      <IssueText path="checks" messages={issues.checks ?? []} />
      {readOnly ? null : (
        <div className="flex flex-wrap items-end gap-2">
          <label className="flex flex-col gap-1 text-[11px] font-semibold uppercase tracking-[0.07em] text-ink-500">
            Kind of check
            <Select value={newKind} onChange={(e) => setNewKind(e.target.value as CheckKind)} className="h-9 normal-case tracking-normal">
              {CHECK_KINDS.map((kind) => (
                <option key={kind} value={kind}>
                  {CHECK_KIND_LABELS[kind]}
                </option>
              ))}
            </Select>
          </label>
          <Button variant="secondary" onClick={() => onChange([...checks, starterCheck(newKind, freeId(checks, newKind))])}>
            Add check
          </Button>
        </div>
      )}
    </div>
  );
}
