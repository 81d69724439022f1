import type { StimulusKind, TestCaseDto } from '@earmark/contracts';
import { useId, useState, type ReactNode } from 'react';
import { Link } from 'react-router';
import { Button } from '@/components/button';
import { Dialog } from '@/components/dialog';
import { Select, TextArea, TextInput } from '@/components/form-controls';
import { InlineError } from '@/components/inline-error';
import { apiFieldIssues, issuesUnder, type FieldIssues } from '@/lib/field-issues';
import { paths } from '@/lib/paths';
import { useSaveTestCase } from '../api/save-test-case';
import {
  createRequestFromForm,
  emptyTestCaseForm,
  renameRequestFromForm,
  STIMULUS_FIELDS,
  STIMULUS_KIND_LABELS,
  STIMULUS_KINDS,
  testCaseToForm,
  updateRequestFromForm,
  type StimulusField,
  type TestCaseFormValues,
} from '../utils/test-case-form';
import { StimulusDownloadButton } from './stimulus-download';

function Field({
  label,
  unit,
  hint,
  errors,
  children,
}: {
  label: string;
  unit?: string;
  hint?: string;
  errors: string[];
  children: (props: { id: string; 'aria-invalid': boolean | undefined; 'aria-describedby': string | undefined }) => ReactNode;
}) {
  const id = useId();
  const errorId = `${id}-error`;
  const hintId = `${id}-hint`;
  const describedBy = [errors.length ? errorId : null, hint ? hintId : null].filter(Boolean).join(' ') || undefined;
  return (
    <div>
      <label htmlFor={id} className="mb-1 block text-[13px] font-medium text-ink-800">
        {label}
        {unit ? <span className="ml-1 font-mono text-xs font-normal text-ink-500">({unit})</span> : null}
      </label>
      {children({ id, 'aria-invalid': errors.length ? true : undefined, 'aria-describedby': describedBy })}
      {hint ? (
        <p id={hintId} className="mt-1 text-xs text-ink-500">
          {hint}
        </p>
      ) : null}
      {errors.length ? (
        <p id={errorId} className="mt-1 text-xs text-fail">
          {errors.join('; ')}
        </p>
      ) : null}
    </div>
  );
}

function StimulusInput({
  field,
  value,
  onChange,
  errors,
}: {
  field: StimulusField;
  value: string | boolean | undefined;
  onChange: (value: string | boolean) => void;
  errors: string[];
}) {
  if (field.type === 'checkbox') {
    return (
      <label className="col-span-2 flex items-center gap-2 text-sm text-ink-800">
        <input type="checkbox" checked={value === true} onChange={(event) => onChange(event.target.checked)} className="size-4 accent-ink-900" />
        {field.label}
      </label>
    );
  }
  return (
    <Field label={field.label} unit={field.unit} hint={field.hint} errors={errors}>
      {(props) =>
        field.type === 'select' ? (
          <Select {...props} value={typeof value === 'string' ? value : ''} onChange={(event) => onChange(event.target.value)} className="w-full">
            <option value="">Default</option>
            {field.options?.map((option) => (
              <option key={option.value} value={option.value}>
                {option.label}
              </option>
            ))}
          </Select>
        ) : (
          <TextInput
            {...props}
            inputMode={field.type === 'number' ? 'decimal' : 'text'}
            placeholder={field.placeholder}
            value={typeof value === 'string' ? value : ''}
            onChange={(event) => onChange(event.target.value)}
            className="w-full font-mono tabular-nums"
          />
        )
      }
    </Field>
  );
}

/**
 * Creates a test case, or edits one (its key is fixed once created). The stimulus fields
 * follow the chosen kind; the contracts' schema checks the whole form on save and each
 * message appears under its field, the API's own messages the same way.
 */
export function TestCaseDialog({
  projectKey,
  testCase,
  open,
  onClose,
}: {
  projectKey: string;
  /** null: a new test case. */
  testCase: TestCaseDto | null;
  open: boolean;
  onClose: () => void;
}) {
  const save = useSaveTestCase(projectKey);
  const [values, setValues] = useState<TestCaseFormValues>(() => (testCase ? testCaseToForm(testCase) : emptyTestCaseForm()));
  const [issues, setIssues] = useState<FieldIssues>({});
  const formId = useId();
  const editing = testCase !== null;
  // Settings that judged captures are reviewed with a mask revision, not edited here.
  const settingsLocked = editing && testCase.hasCaptures;

  const close = () => {
    save.reset();
    setIssues({});
    onClose();
  };

  const submit = () => {
    const options = { onSuccess: close, onError: (error: unknown) => setIssues(apiFieldIssues(error)) };
    if (editing) {
      const result = settingsLocked ? renameRequestFromForm(values) : updateRequestFromForm(values);
      if (!result.ok) return setIssues(result.issues);
      setIssues({});
      save.mutate({ mode: 'update', caseKey: testCase.key, body: result.body }, options);
    } else {
      const result = createRequestFromForm(values);
      if (!result.ok) return setIssues(result.issues);
      setIssues({});
      save.mutate({ mode: 'create', body: result.body }, options);
    }
  };

  const at = (path: string) => issues[path] ?? [];
  const setStimulus = (name: string, value: string | boolean) => setValues((v) => ({ ...v, stimulus: { ...v.stimulus, [name]: value } }));
  // Messages about the stimulus as a whole (or a field this kind does not show) go above its fields.
  const shown = new Set(STIMULUS_FIELDS[values.kind].map((f) => `stimulus.${f.name}`));
  const stimulusOther = Object.entries(issues)
    .filter(([path]) => (path === 'stimulus' || path.startsWith('stimulus.')) && !shown.has(path))
    .flatMap(([, messages]) => messages);

  return (
    <Dialog
      open={open}
      onClose={close}
      variant="side"
      className="w-[min(560px,100vw)]"
      title={editing ? `Edit ${testCase.key}` : 'New test case'}
      description={
        editing
          ? 'Stimulus, analysis settings and channel map change here only while no captures of this test case exist.'
          : 'A test case names the signal rigs play and how Earmark analyses what comes back.'
      }
      footer={
        <>
          <Button variant="ghost" onClick={close}>
            Cancel
          </Button>
          <Button type="submit" form={formId} busy={save.isPending}>
            {editing ? 'Save test case' : 'Create test case'}
          </Button>
        </>
      }
    >
      <form
        id={formId}
        noValidate
        className="space-y-6"
        onSubmit={(event) => {
          event.preventDefault();
          submit();
        }}
      >
        {save.error ? <InlineError error={save.error} /> : null}
        {settingsLocked ? (
          <div role="note" aria-label="Settings under review" className="rounded-md border border-line-strong bg-paper px-3 py-2 text-sm text-ink-800">
            <p>
              Captures of this test case exist, so its stimulus, analysis settings and channel map are under review: changing them would change
              verdicts. Draft a mask revision with the new settings; they come into force when a QA manager approves it. Name and description stay
              editable here.
            </p>
            <Link to={paths.masks(projectKey, testCase.key)} className="mt-1 inline-block font-medium text-ink-950 underline decoration-ink-300 underline-offset-4 hover:decoration-ink-800">
              Open the masks of {testCase.key}
            </Link>
          </div>
        ) : null}
        <fieldset className="space-y-3">
          <legend className="mb-2 text-[11px] font-semibold uppercase tracking-[0.08em] text-ink-500">Test case</legend>
          {editing ? null : (
            <Field label="Key" hint="Lower-case letters, digits, dots, dashes and underscores, e.g. eq.music.sweep" errors={at('key')}>
              {(props) => (
                <TextInput {...props} data-autofocus="" value={values.key} onChange={(e) => setValues((v) => ({ ...v, key: e.target.value }))} className="w-full font-mono" />
              )}
            </Field>
          )}
          <Field label="Name" errors={at('name')}>
            {(props) => <TextInput {...props} value={values.name} onChange={(e) => setValues((v) => ({ ...v, name: e.target.value }))} className="w-full" />}
          </Field>
          <Field label="Description" errors={at('description')}>
            {(props) => (
              <TextArea {...props} rows={2} value={values.description} onChange={(e) => setValues((v) => ({ ...v, description: e.target.value }))} />
            )}
          </Field>
        </fieldset>

        <fieldset className="space-y-3 disabled:opacity-70" disabled={settingsLocked}>
          <legend className="mb-2 text-[11px] font-semibold uppercase tracking-[0.08em] text-ink-500">Stimulus</legend>
          <Field label="Signal" errors={at('stimulus.kind')}>
            {(props) => (
              <Select {...props} value={values.kind} onChange={(e) => setValues((v) => ({ ...v, kind: e.target.value as StimulusKind }))} className="w-full">
                {STIMULUS_KINDS.map((kind) => (
                  <option key={kind} value={kind}>
                    {STIMULUS_KIND_LABELS[kind]}
                  </option>
                ))}
              </Select>
            )}
          </Field>
          {stimulusOther.length ? (
            <p role="alert" className="text-xs text-fail">
              {stimulusOther.join('; ')}
            </p>
          ) : null}
          <div className="grid grid-cols-2 gap-3">
            {STIMULUS_FIELDS[values.kind].map((field) => (
              <StimulusInput
                key={`${values.kind}-${field.name}`}
                field={field}
                value={values.stimulus[field.name]}
                onChange={(value) => setStimulus(field.name, value)}
                errors={at(`stimulus.${field.name}`)}
              />
            ))}
          </div>
          {editing && !settingsLocked ? <StimulusDownloadButton projectKey={projectKey} caseKey={testCase.key} /> : null}
        </fieldset>
        {/* A disabled fieldset would disable the download too. */}
        {settingsLocked ? <StimulusDownloadButton projectKey={projectKey} caseKey={testCase.key} /> : null}

        <fieldset className="space-y-3 disabled:opacity-70" disabled={settingsLocked}>
          <legend className="mb-2 text-[11px] font-semibold uppercase tracking-[0.08em] text-ink-500">Analysis</legend>
          <Field label="Transfer estimator" errors={at('analysis.transferMethod')}>
            {(props) => (
              <Select
                {...props}
                value={values.transferMethod}
                onChange={(e) => setValues((v) => ({ ...v, transferMethod: e.target.value as TestCaseFormValues['transferMethod'] }))}
                className="w-full"
              >
                <option value="">Default (deconvolution for sweeps, H1 otherwise)</option>
                <option value="h1">H1 (averaged cross-spectrum)</option>
                <option value="deconvolution">Deconvolution</option>
              </Select>
            )}
          </Field>
          <div className="grid grid-cols-2 gap-3">
            <Field label="Transfer band from" unit="Hz" errors={issuesUnder(issues, 'analysis.transferBandHz')}>
              {(props) => (
                <TextInput {...props} inputMode="decimal" placeholder="auto" value={values.transferLo} onChange={(e) => setValues((v) => ({ ...v, transferLo: e.target.value }))} className="w-full font-mono" />
              )}
            </Field>
            <Field label="Transfer band to" unit="Hz" errors={[]}>
              {(props) => (
                <TextInput {...props} inputMode="decimal" placeholder="auto" value={values.transferHi} onChange={(e) => setValues((v) => ({ ...v, transferHi: e.target.value }))} className="w-full font-mono" />
              )}
            </Field>
          </div>
          <Field label="Channels to analyse" hint="Comma-separated, from 0; empty analyses every channel" errors={issuesUnder(issues, 'channelMap')}>
            {(props) => (
              <TextInput {...props} placeholder="all" value={values.channelMap} onChange={(e) => setValues((v) => ({ ...v, channelMap: e.target.value }))} className="w-full font-mono" />
            )}
          </Field>
        </fieldset>
      </form>
    </Dialog>
  );
}
