import type { MagnitudeEnvelopeCheck, MaskCheck, MaskRevisionDto } from '@earmark/contracts';
import { useMemo, useState } from 'react';
import { Button } from '@/components/button';
import { Select, TextArea } from '@/components/form-controls';
import { InlineError } from '@/components/inline-error';
import { RevisionStateBadge } from '@/components/revision-state-badge';
import { useCurrentUser } from '@/lib/authorization';
import { apiFieldIssues } from '@/lib/field-issues';
import { formatDateTime } from '@/lib/format-time';
import { useCandidateCaptures } from '../api/get-candidate-captures';
import { useTargets } from '../api/get-targets';
import { useCopyRevision, useSubmitRevision } from '../api/revision-actions';
import { useSaveDraft } from '../api/save-draft';
import { drawablePoints, starterCheck, toEditorCheck, validateChecks, type EditorCheck } from '../utils/editor-checks';
import { settingsFromForm, settingsToForm, type SettingsFormValues } from '../utils/settings-form';
import { ChecksEditor } from './checks-editor';
import { DeriveWizard } from './derive-wizard';
import { placeDerived, placeDerivedInChecks, type DerivedPlacement } from '../utils/derive-wizard';
import { LimitPreview } from './limit-preview';
import { ReevaluateButton } from './reevaluate-button';
import { RevisionSettings } from './revision-settings';
import { useUnsavedChangesGuard } from './unsaved-changes-guard';
import { notify } from '@/components/toast';
import { ApiError } from '@/lib/api-error';

/** What the editor holds: a stored revision, or a new draft that is not saved yet. */
export type EditorSource = { revision: MaskRevisionDto } | { unsaved: { checks: MaskCheck[]; note: string; target: string | null } };

function initialChecks(source: EditorSource): EditorCheck[] {
  const checks = 'revision' in source ? source.revision.checks : source.unsaved.checks;
  return checks.length ? checks.map(toEditorCheck) : [starterCheck('magnitude-envelope', 'response')];
}


/**
 * One revision open: its checks in the table editor (editable for the user's own drafts,
 * read-only otherwise: only a draft's author edits or submits it), the live preview over a
 * recent capture, and the actions that fit its state. The parent keys this component by the revision, so switching starts
 * from the stored checks.
 */
export function MaskWorkspace({
  projectKey,
  caseKey,
  source,
  canDraft,
  onOpenRevision,
  onStartDraft,
}: {
  projectKey: string;
  caseKey: string;
  source: EditorSource;
  canDraft: boolean;
  onOpenRevision: (revision: number) => void;
  /** Opens a new unsaved draft holding these checks. */
  onStartDraft: (checks: MaskCheck[]) => void;
}) {
  const stored = 'revision' in source ? source.revision : null;
  const me = useCurrentUser();
  // An unsaved draft is the user's own; a stored one only when they wrote it.
  const mine = stored === null || (me !== undefined && stored.author === me.email);
  const editable = canDraft && mine && (stored === null || stored.state === 'draft');
  const someoneElsesDraft = canDraft && !mine && stored?.state === 'draft';
  const [checks, setChecks] = useState<EditorCheck[]>(() => initialChecks(source));
  const [note, setNote] = useState(stored?.note ?? ('unsaved' in source ? source.unsaved.note : ''));
  const [target, setTarget] = useState<string | null>(stored ? stored.target : 'unsaved' in source ? source.unsaved.target : null);
  const [dirty, setDirty] = useState(stored === null);
  const [deriving, setDeriving] = useState(false);
  const [previewUid, setPreviewUid] = useState<string | null>(null);
  const [captureId, setCaptureId] = useState<string | null>(null);
  // A stored draft's author edits its judging settings too (a new draft starts from the test case's).
  const settingsEditable = editable && stored !== null;
  const [settingsForm, setSettingsForm] = useState<SettingsFormValues | null>(() => (stored ? settingsToForm(stored.settings) : null));

  const save = useSaveDraft(projectKey, caseKey);
  const submit = useSubmitRevision(projectKey, caseKey);
  const copy = useCopyRevision(projectKey, caseKey);
  const targets = useTargets(projectKey);
  const candidates = useCandidateCaptures(projectKey, caseKey);

  const guard = useUnsavedChangesGuard(editable && dirty);
  const validation = useMemo(() => validateChecks(checks), [checks]);
  const settingsResult = useMemo(() => (settingsEditable && settingsForm ? settingsFromForm(settingsForm) : null), [settingsEditable, settingsForm]);
  const settingsIssues = settingsResult && !settingsResult.ok ? settingsResult.issues : save.error ? apiFieldIssues(save.error) : {};
  const canSave = validation.ok && (settingsResult === null || settingsResult.ok);
  const issues = validation.ok ? (save.error ? apiFieldIssues(save.error) : {}) : validation.issues;
  const change = (next: EditorCheck[]) => {
    setChecks(next);
    setDirty(true);
  };

  // The preview follows the chosen envelope, else the first one in the draft.
  const envelopes = checks.filter((c) => c.kind === 'magnitude-envelope');
  const previewed = envelopes.find((c) => c.uid === previewUid) ?? envelopes[0] ?? null;
  const upper = useMemo(() => drawablePoints(previewed?.upper ?? null), [previewed?.upper]);
  const lower = useMemo(() => drawablePoints(previewed?.lower ?? null), [previewed?.lower]);
  const chosenCapture = captureId ?? candidates.data?.[0]?.captureId ?? null;

  const saveDraft = async (): Promise<MaskRevisionDto | null> => {
    if (!validation.ok || (settingsResult !== null && !settingsResult.ok)) return null;
    // Only changed settings are sent, so the audit trail shows a settings edit only when there was one.
    const settingsChanged = stored !== null && settingsForm !== null && JSON.stringify(settingsForm) !== JSON.stringify(settingsToForm(stored.settings));
    const settings = settingsChanged && settingsResult?.ok ? settingsResult.settings : undefined;
    const saved = await save.mutateAsync({ revision: stored?.revision ?? null, checks: validation.checks, note, target, ...(settings ? { settings } : {}) });
    setDirty(false);
    return saved;
  };

  const failed = (what: string) => (error: unknown) => notify.error(what, error instanceof ApiError ? error.detail : undefined);

  const onSave = () => {
    void saveDraft()
      .then((saved) => {
        if (!saved) return;
        notify.success(`Draft saved as revision ${saved.revision}`, `${caseKey}: ${saved.checks.length} ${saved.checks.length === 1 ? 'check' : 'checks'}`);
        if (stored === null) {
          guard.allowNext();
          onOpenRevision(saved.revision);
        }
      })
      .catch(failed('The draft was not saved'));
  };

  const onSubmit = () => {
    void (async () => {
      const revision = dirty || stored === null ? await saveDraft() : stored;
      if (!revision) return;
      await submit.mutateAsync(revision.revision);
      notify.success(`Revision ${revision.revision} submitted for review`, 'A QA manager of this project decides it under Approvals.');
      guard.allowNext();
      onOpenRevision(revision.revision);
    })().catch(failed('The revision was not submitted'));
  };

  const onUseDerived = (derived: MagnitudeEnvelopeCheck, placement: DerivedPlacement) => {
    setDeriving(false);
    const where = placement.mode === 'replace' ? `${placement.checkId} now holds the derived limits` : 'The derived limits were added as a new check';
    if (editable) {
      const next = placeDerived(checks, derived, placement, (c) => c.fields.id ?? '', toEditorCheck);
      const before = new Set(checks.map((c) => c.uid));
      change(next);
      // The preview follows the new check, not the one it replaced.
      setPreviewUid(next.find((c) => !before.has(c.uid))?.uid ?? null);
      notify.success('Derived limits in the draft', `${where}. Save the draft to keep them.`);
    } else {
      onStartDraft(placeDerivedInChecks(stored?.checks ?? [], derived, placement));
      notify.success('New draft with derived limits', `${where}. Save the draft to keep them.`);
    }
  };

  const actionError = save.error ?? submit.error ?? copy.error;
  return (
    <div className="min-w-0 space-y-4">
      {guard.prompt}
      <div className="flex flex-wrap items-start justify-between gap-3 rounded-lg border border-line bg-paper-raised px-4 py-3">
        <div className="min-w-0 space-y-1">
          <div className="flex flex-wrap items-center gap-2">
            <h2 className="text-base font-semibold text-ink-950">{stored ? `Revision ${stored.revision}` : 'New draft'}</h2>
            {stored ? <RevisionStateBadge state={stored.state} /> : <RevisionStateBadge state="draft" />}
            {editable && dirty ? <span className="text-xs text-ink-500">Unsaved changes</span> : null}
          </div>
          {stored ? (
            <p className="text-xs text-ink-600">
              Drafted by {stored.author} on {formatDateTime(stored.createdAt)}
              {stored.reviewer ? ` · ${stored.state === 'rejected' ? 'rejected' : 'reviewed'} by ${stored.reviewer}` : ''}
              {stored.decidedAt ? ` on ${formatDateTime(stored.decidedAt)}` : ''}
            </p>
          ) : (
            <p className="text-xs text-ink-600">Not saved yet. Save it to keep it; submit it when it is ready for a QA manager.</p>
          )}
        </div>
        {canDraft ? (
          <div className="flex flex-wrap items-center gap-2">
            <Button variant="secondary" onClick={() => setDeriving(true)} disabled={!candidates.data}>
              Derive from captures
            </Button>
            {stored ? (
              <Button variant="secondary" busy={copy.isPending} onClick={() => copy.mutate(
                    { revision: stored.revision, body: {} },
                    {
                      onSuccess: (r) => {
                        notify.success(`Copied to a new draft, revision ${r.revision}`);
                        onOpenRevision(r.revision);
                      },
                    },
                  )}>
                Copy to new draft
              </Button>
            ) : null}
            {stored?.state === 'approved' ? <ReevaluateButton projectKey={projectKey} caseKey={caseKey} revision={stored.revision} /> : null}
            {editable ? (
              <>
                <Button variant="secondary" busy={save.isPending && !submit.isPending} disabled={!canSave || (!dirty && stored !== null)} onClick={onSave}>
                  Save draft
                </Button>
                <Button busy={submit.isPending} disabled={!canSave} onClick={onSubmit}>
                  Submit for review
                </Button>
              </>
            ) : null}
          </div>
        ) : null}
      </div>

      {someoneElsesDraft ? (
        <p role="note" className="rounded-md border border-line bg-paper-raised px-3 py-2 text-sm text-ink-700">
          Only its author, {stored.author}, can change or submit this draft. Copy it to a draft of your own to propose other limits.
        </p>
      ) : null}
      {actionError ? <InlineError error={actionError} /> : null}
      {editable && !validation.ok ? (
        <p role="status" className="text-xs text-fail">
          {Object.keys(validation.issues).length === 1 ? 'One problem' : `${Object.keys(validation.issues).length} problems`} to fix before this draft can be saved;
          each is shown under its cell.
        </p>
      ) : null}

      {editable ? (
        <div className="grid gap-3 sm:grid-cols-[minmax(0,2fr)_minmax(0,1fr)]">
          <label className="block text-[11px] font-semibold uppercase tracking-[0.07em] text-ink-500">
            Note
            <TextArea
              rows={2}
              value={note}
              onChange={(e) => {
                setNote(e.target.value);
                setDirty(true);
              }}
              placeholder="What changed and why, for the reviewer"
              className="mt-1 normal-case tracking-normal"
            />
          </label>
          <label className="block text-[11px] font-semibold uppercase tracking-[0.07em] text-ink-500">
            Target
            <Select
              value={target ?? ''}
              onChange={(e) => {
                setTarget(e.target.value || null);
                setDirty(true);
              }}
              className="mt-1 w-full normal-case tracking-normal"
            >
              <option value="">All targets without their own mask</option>
              {targets.data?.map((t) => (
                <option key={t.key} value={t.key}>
                  {t.key} — {t.name}
                </option>
              ))}
            </Select>
          </label>
        </div>
      ) : stored?.note ? (
        <p className="rounded-md border border-line bg-paper-raised px-3 py-2 text-sm text-ink-700">{stored.note}</p>
      ) : null}

      {stored ? (
        <RevisionSettings
          settings={stored.settings}
          form={settingsEditable ? settingsForm : null}
          issues={settingsIssues}
          onChange={(next) => {
            setSettingsForm(next);
            setDirty(true);
          }}
        />
      ) : null}

      <ChecksEditor
        checks={checks}
        issues={editable ? issues : {}}
        readOnly={!editable}
        onChange={change}
        selectedUid={previewed?.uid ?? null}
        onSelect={setPreviewUid}
      />

      <LimitPreview
        projectKey={projectKey}
        candidates={{ data: candidates.data, isPending: candidates.isPending, error: candidates.error }}
        captureId={chosenCapture}
        onCaptureChange={setCaptureId}
        upper={upper}
        lower={lower}
        checkName={previewed ? previewed.fields.id || 'unnamed check' : null}
      />

      {deriving && candidates.data ? (
        <DeriveWizard
          projectKey={projectKey}
          caseKey={caseKey}
          open
          onClose={() => setDeriving(false)}
          candidates={candidates.data}
          envelopeIds={envelopes.map((c) => c.fields.id ?? '').filter(Boolean)}
          checkIds={checks.map((c) => c.fields.id ?? '')}
          replaceId={previewed?.fields.id || null}
          onUse={onUseDerived}
        />
      ) : null}
    </div>
  );
}
