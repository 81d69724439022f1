import type { JudgingSettings } from '@earmark/contracts';
import { Select, TextInput } from '@/components/form-controls';
import { JudgingSettingsSummary } from '@/components/judging-settings-summary';
import { issuesUnder, type FieldIssues } from '@/lib/field-issues';
import { describeStimulusBrief } from '@/lib/judging-settings';
import type { SettingsFormValues } from '../utils/settings-form';

const labelClass = 'block text-[11px] font-semibold uppercase tracking-[0.07em] text-ink-500';

function Problems({ messages }: { messages: string[] }) {
  return messages.length ? <span className="mt-1 block text-xs normal-case tracking-normal text-fail">{messages.join('; ')}</span> : null;
}

/**
 * The stimulus, analysis settings and channel map a revision judges with. A draft's author
 * edits the analysis settings and channel map here; they are reviewed with the checks and
 * judge captures once the revision is approved.
 */
export function RevisionSettings({
  settings,
  form,
  issues,
  onChange,
}: {
  settings: JudgingSettings;
  /** null: read-only. */
  form: SettingsFormValues | null;
  issues: FieldIssues;
  onChange: (next: SettingsFormValues) => void;
}) {
  if (!form) {
    return (
      <section aria-label="Judging settings" className="rounded-md border border-line bg-paper-raised px-3 py-2">
        <JudgingSettingsSummary settings={settings} label="Settings this revision judges with" />
      </section>
    );
  }
  const set = (patch: Partial<SettingsFormValues>) => onChange({ ...form, ...patch });
  return (
    <section aria-label="Judging settings" className="space-y-2 rounded-md border border-line bg-paper-raised px-3 py-3">
      <p className="text-xs text-ink-600">
        Judging settings of this draft: reviewed with its checks, they judge captures once it is approved. Stimulus{' '}
        <span className="font-mono text-ink-900">{describeStimulusBrief(settings.stimulus)}</span>.
      </p>
      <div className="grid gap-3 sm:grid-cols-4">
        <label className={labelClass}>
          Transfer estimator
          <Select
            value={form.transferMethod}
            onChange={(e) => set({ transferMethod: e.target.value as SettingsFormValues['transferMethod'] })}
            className="mt-1 w-full normal-case tracking-normal"
          >
            <option value="">Default (deconvolution for sweeps, H1 otherwise)</option>
            <option value="h1">H1</option>
            <option value="deconvolution">Deconvolution</option>
          </Select>
        </label>
        <label className={labelClass}>
          Band from (Hz)
          <TextInput value={form.transferLo} placeholder="auto" inputMode="decimal" onChange={(e) => set({ transferLo: e.target.value })} className="mt-1 w-full font-mono" />
          <Problems messages={issuesUnder(issues, 'settings.analysis')} />
        </label>
        <label className={labelClass}>
          Band to (Hz)
          <TextInput value={form.transferHi} placeholder="auto" inputMode="decimal" onChange={(e) => set({ transferHi: e.target.value })} className="mt-1 w-full font-mono" />
        </label>
        <label className={labelClass}>
          Channels to analyse
          <TextInput value={form.channelMap} placeholder="all" onChange={(e) => set({ channelMap: e.target.value })} className="mt-1 w-full font-mono" />
          <Problems messages={issuesUnder(issues, 'settings.channelMap')} />
        </label>
      </div>
    </section>
  );
}
