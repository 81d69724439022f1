import { Button } from '@/components/button';
import { InlineError } from '@/components/inline-error';
import { cn } from '@/lib/cn';
import { useDownloadStimulus } from '../api/download-stimulus';

export const LOUDNESS_CAUTION =
  'Test signals can be loud: played through loudspeakers or headphones they can damage hearing and drivers; start at a low level.';

/** The caution every stimulus download carries; `id` lets buttons point at it (aria-describedby). */
export function LoudnessCaution({ id, className }: { id?: string; className?: string }) {
  return (
    <p id={id} className={cn('flex items-start gap-2 text-xs text-ink-700', className)}>
      <svg viewBox="0 0 16 16" aria-hidden="true" className="mt-px size-4 shrink-0 text-brass-600">
        <path d="M8 1.8 15 14H1Z" fill="none" stroke="currentColor" strokeWidth="1.4" strokeLinejoin="round" />
        <path d="M8 6.2v3.6" stroke="currentColor" strokeWidth="1.5" strokeLinecap="round" />
        <circle cx="8" cy="11.8" r="0.9" fill="currentColor" />
      </svg>
      <span>
        <span className="font-semibold">Caution:</span> {LOUDNESS_CAUTION}
      </span>
    </p>
  );
}

/** "Download stimulus WAV" with the caution beside it. */
export function StimulusDownloadButton({
  projectKey,
  caseKey,
  compact = false,
  describedBy,
}: {
  projectKey: string;
  caseKey: string;
  /** In a table row: a smaller button whose caution is shown once above the table. */
  compact?: boolean;
  describedBy?: string;
}) {
  const download = useDownloadStimulus(projectKey);
  return (
    <div className={cn('flex gap-3', compact ? 'flex-col items-end' : 'flex-wrap items-start')}>
      <Button
        variant="secondary"
        className={compact ? 'h-8 px-2.5 text-[13px]' : undefined}
        busy={download.isPending}
        aria-describedby={describedBy}
        aria-label={compact ? `Download stimulus WAV of ${caseKey}` : undefined}
        onClick={() => download.mutate(caseKey)}
        icon={
          <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4">
            <path d="M8 2.5v8m0 0 3-3m-3 3-3-3M3 13.5h10" fill="none" stroke="currentColor" strokeWidth="1.4" strokeLinecap="round" strokeLinejoin="round" />
          </svg>
        }
      >
        {compact ? 'WAV' : 'Download stimulus WAV'}
      </Button>
      {compact ? null : <LoudnessCaution className="max-w-sm" />}
      {download.error ? <InlineError error={download.error} className="max-w-sm" /> : null}
    </div>
  );
}
