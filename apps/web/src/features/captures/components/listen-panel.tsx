import type { AudioKind } from '@earmark/contracts';
import { useQueryClient } from '@tanstack/react-query';
import { useEffect, useId, useRef, useState } from 'react';
import { Spinner } from '@/components/spinner';
import { ApiError } from '@/lib/api-error';
import { cn } from '@/lib/cn';
import { getCaptureAudioQueryOptions } from '../api/get-capture-audio';
import { audioContextConstructor, createAudioPlayer, type AudioPlayer } from '../utils/audio-player';
import { plain } from '@/lib/plot/log-frequency';
import { clampPlaybackLevelDb, PLAYBACK_LEVEL } from '../utils/playback-level';
import { PanelCard } from './panel-card';

export const LISTEN_CAUTION =
  'Test signals and residuals can be loud. Playing them through loudspeakers or headphones can damage hearing and drivers. Start at a low level.';

const ACK_KEY = 'earmark.listen.caution-acknowledged';

function readAcknowledged(): boolean {
  try {
    return window.sessionStorage.getItem(ACK_KEY) === '1';
  } catch {
    return false;
  }
}

function storeAcknowledged(value: boolean): void {
  try {
    if (value) window.sessionStorage.setItem(ACK_KEY, '1');
    else window.sessionStorage.removeItem(ACK_KEY);
  } catch {
    // Storage disabled: the acknowledgement lasts as long as the page.
  }
}

const sources: { kind: AudioKind; label: string; hint: string }[] = [
  { kind: 'capture', label: 'Play capture', hint: 'What the firmware put out' },
  { kind: 'stimulus', label: 'Play stimulus', hint: 'The test signal it was given' },
  { kind: 'residual', label: 'Play residual', hint: 'What is left when the expected signal is taken out' },
];

function describeError(error: unknown): string {
  if (error instanceof ApiError) return error.detail ? `${error.title}: ${error.detail}` : error.title;
  if (error instanceof DOMException && error.name === 'EncodingError') return 'The browser could not decode this audio.';
  return 'Playback failed.';
}

function PlayIcon() {
  return (
    <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3">
      <path d="M3 1.8v8.4L10 6Z" fill="currentColor" />
    </svg>
  );
}

/**
 * Listening to the capture, its stimulus and the residual. Test signals can be loud: the
 * caution is acknowledged once per browser session before anything plays, playback starts
 * at −30 dB and the level is capped at −6 dB re full scale (utils/playback-level.ts).
 */
export function ListenPanel({ projectKey, captureId }: { projectKey: string; captureId: string }) {
  const queryClient = useQueryClient();
  const [acknowledged, setAcknowledged] = useState(readAcknowledged);
  const [levelDb, setLevelDb] = useState<number>(PLAYBACK_LEVEL.initialDb);
  const [playing, setPlaying] = useState<AudioKind | null>(null);
  const [loading, setLoading] = useState<AudioKind | null>(null);
  const [error, setError] = useState<{ kind: AudioKind; message: string } | null>(null);
  const playerRef = useRef<AudioPlayer | null>(null);
  const buffers = useRef(new Map<AudioKind, AudioBuffer>());
  const cautionId = useId();
  const sliderId = useId();
  const Context = audioContextConstructor();

  useEffect(() => {
    const cached = buffers.current;
    return () => {
      playerRef.current?.close();
      playerRef.current = null;
      cached.clear();
    };
  }, [projectKey, captureId]);

  const play = async (kind: AudioKind) => {
    if (!acknowledged || !Context) return;
    setError(null);
    playerRef.current ??= createAudioPlayer(Context);
    const player = playerRef.current;
    try {
      let buffer = buffers.current.get(kind);
      if (!buffer) {
        setLoading(kind);
        const bytes = await queryClient.fetchQuery(getCaptureAudioQueryOptions(projectKey, captureId, kind));
        buffer = await player.decode(bytes);
        buffers.current.set(kind, buffer);
      }
      player.play(buffer, levelDb, () => setPlaying((current) => (current === kind ? null : current)));
      setPlaying(kind);
    } catch (cause) {
      setError({ kind, message: describeError(cause) });
      setPlaying(null);
    } finally {
      setLoading(null);
    }
  };

  const stop = () => {
    playerRef.current?.stop();
    setPlaying(null);
  };

  const changeLevel = (value: number) => {
    const next = clampPlaybackLevelDb(value);
    setLevelDb(next);
    playerRef.current?.setLevel(next);
  };

  const acknowledge = (value: boolean) => {
    setAcknowledged(value);
    storeAcknowledged(value);
    if (!value) stop();
  };

  return (
    <PanelCard title="Listen">
      <div className="space-y-4">
        <div id={cautionId} role="note" aria-label="Listening caution" className="rounded-md border border-ink-900/15 border-l-[3px] border-l-ink-900 bg-brass-50 px-3.5 py-3">
          <p className="flex items-start gap-2.5 text-[13px] leading-snug text-ink-900">
            <svg viewBox="0 0 16 16" aria-hidden="true" className="mt-0.5 size-4 shrink-0 text-ink-900">
              <path d="M8 1.5 15 14H1Z" fill="currentColor" />
              <path d="M8 6v3.6" stroke="var(--color-brass-50)" strokeWidth="1.6" strokeLinecap="round" />
              <circle cx="8" cy="11.7" r="0.9" fill="var(--color-brass-50)" />
            </svg>
            <span>
              <span className="font-semibold">Caution. </span>
              {LISTEN_CAUTION}
            </span>
          </p>
          <label className="mt-3 flex items-start gap-2.5 text-[13px] text-ink-800">
            <input type="checkbox" checked={acknowledged} onChange={(event) => acknowledge(event.target.checked)} className="mt-0.5 size-4 shrink-0 accent-ink-900" />
            <span>I understand. Playback starts at {plain(PLAYBACK_LEVEL.initialDb, 0)} dB and never goes above {plain(PLAYBACK_LEVEL.maxDb, 0)} dB re full scale.</span>
          </label>
        </div>

        {!Context ? (
          <p className="text-sm text-ink-600">This browser cannot play audio (no Web Audio support).</p>
        ) : null}

        <ul className="space-y-1.5">
          {sources.map((source) => {
            const isPlaying = playing === source.kind;
            const isLoading = loading === source.kind;
            return (
              <li key={source.kind}>
                <button
                  type="button"
                  disabled={!acknowledged || !Context || isLoading}
                  aria-label={source.label}
                  aria-describedby={acknowledged ? undefined : cautionId}
                  aria-pressed={isPlaying}
                  onClick={() => void play(source.kind)}
                  className={cn(
                    'flex w-full items-center gap-3 rounded-md border px-3 py-2 text-left transition-colors disabled:cursor-not-allowed disabled:opacity-50',
                    isPlaying ? 'border-ink-900 bg-ink-900 text-paper' : 'border-line-strong bg-paper-raised text-ink-900 hover:border-ink-400',
                  )}
                >
                  <span className={cn('grid size-7 shrink-0 place-items-center rounded-full', isPlaying ? 'bg-brass-400 text-ink-950' : 'bg-ink-900/[0.06] text-ink-800')}>
                    {isLoading ? <Spinner className="size-3.5" /> : <PlayIcon />}
                  </span>
                  <span className="min-w-0">
                    <span className="block text-sm font-medium">{source.label}</span>
                    <span className={cn('block truncate text-xs', isPlaying ? 'text-ink-300' : 'text-ink-500')}>
                      {isPlaying ? 'Playing…' : source.hint}
                    </span>
                  </span>
                </button>
                {error?.kind === source.kind ? (
                  <p role="alert" className="mt-1 flex items-start gap-1.5 px-1 text-xs text-fail">
                    <svg viewBox="0 0 12 12" aria-hidden="true" className="mt-0.5 size-3 shrink-0">
                      <rect x="0.5" y="0.5" width="11" height="11" rx="1.5" fill="currentColor" />
                      <path d="m3.8 3.8 4.4 4.4m0-4.4-4.4 4.4" stroke="white" strokeWidth="1.5" strokeLinecap="round" />
                    </svg>
                    {error.message}
                  </p>
                ) : null}
              </li>
            );
          })}
        </ul>

        <div className="flex items-end gap-3">
          <div className="min-w-0 flex-1">
            <div className="flex items-baseline justify-between">
              <label htmlFor={sliderId} className="text-xs font-semibold text-ink-700">
                Playback level
              </label>
              <span className="font-mono text-xs tabular-nums text-ink-900">{plain(levelDb, 0)} dB</span>
            </div>
            <input
              id={sliderId}
              type="range"
              min={PLAYBACK_LEVEL.minDb}
              max={PLAYBACK_LEVEL.maxDb}
              step={PLAYBACK_LEVEL.stepDb}
              value={levelDb}
              aria-valuetext={`${plain(levelDb, 0)} dB re full scale`}
              onChange={(event) => changeLevel(Number(event.target.value))}
              className="mt-1 w-full accent-ink-900"
            />
            <div className="flex justify-between font-mono text-[10px] text-ink-400">
              <span>{plain(PLAYBACK_LEVEL.minDb, 0)} dB</span>
              <span>cap {plain(PLAYBACK_LEVEL.maxDb, 0)} dB</span>
            </div>
          </div>
          <button
            type="button"
            onClick={stop}
            disabled={playing === null}
            className="inline-flex h-9 shrink-0 items-center gap-2 rounded-md border border-line-strong bg-paper-raised px-3 text-sm font-medium text-ink-900 hover:border-ink-400 disabled:cursor-not-allowed disabled:opacity-50"
          >
            <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3">
              <rect x="2" y="2" width="8" height="8" rx="1" fill="currentColor" />
            </svg>
            Stop
          </button>
        </div>
      </div>
    </PanelCard>
  );
}
