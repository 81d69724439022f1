import type { JudgingSettings } from '@earmark/contracts';
import { cn } from '@/lib/cn';
import { describeAnalysis, describeChannelMap, describeStimulusBrief } from '@/lib/judging-settings';

/**
 * One line: the stimulus, analysis settings and channel map a verdict used (or a revision
 * judges with). They change verdicts as much as the mask does, so they are shown beside it.
 */
export function JudgingSettingsSummary({ settings, label, className }: { settings: JudgingSettings; label: string; className?: string }) {
  return (
    <dl aria-label={label} className={cn('flex flex-wrap items-baseline gap-x-4 gap-y-1 text-xs text-ink-600', className)}>
      <div className="flex items-baseline gap-1.5">
        <dt>Stimulus</dt>
        <dd className="font-mono text-ink-900">{describeStimulusBrief(settings.stimulus)}</dd>
      </div>
      <div className="flex items-baseline gap-1.5">
        <dt>Analysis</dt>
        <dd className="font-mono text-ink-900">{describeAnalysis(settings)}</dd>
      </div>
      <div className="flex items-baseline gap-1.5">
        <dt>Channels</dt>
        <dd className="font-mono text-ink-900">{describeChannelMap(settings.channelMap)}</dd>
      </div>
    </dl>
  );
}
