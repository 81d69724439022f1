import { useCallback, useMemo, useRef, useState } from 'react';
import type { CapturePlotParams } from '../api/get-capture-plot';
import { columnsForWidth } from '../utils/plot-data';
import type { FrequencyRange } from '@/lib/plot/log-frequency';
import type { PlotSelection } from '../utils/plot-selection';

/**
 * What the capture page's panels share: the channel shown, the plot resolution (set by the
 * spectrum's width, so every panel reads one response), the last-pass comparison and one
 * frequency zoom for the spectrum, phase and group-delay plots.
 */
export type CaptureView = {
  channel: number;
  setChannel: (channel: number) => void;
  /** The spectral check whose limits the spectrum draws (null: the mask has none). */
  checkId: string | null;
  /** Shows another check, on the channel given (its worst). */
  setCheck: (checkId: string | null, channel: number) => void;
  showOverlay: boolean;
  setShowOverlay: (show: boolean) => void;
  /** null until the spectrum has been laid out. */
  plotParams: CapturePlotParams | null;
  setPlotWidth: (cssWidth: number) => void;
  /** null = the whole measured range. */
  frequencyRange: FrequencyRange | null;
  setFrequencyRange: (range: FrequencyRange | null) => void;
  /** Zooms the frequency plots to about an octave either side of hz and brings the spectrum into view. */
  showFrequency: (hz: number) => void;
  spectrumRef: React.RefObject<HTMLElement | null>;
};

export function useCaptureView({ hasLastPassing, initial }: { hasLastPassing: boolean; initial?: PlotSelection }): CaptureView {
  // The page opens on the worst failing check and channel (utils/plot-selection.ts).
  const [channel, setChannelState] = useState(initial?.channel ?? 0);
  const [checkId, setCheckId] = useState<string | null>(initial?.checkId ?? null);
  const [showOverlay, setShowOverlay] = useState(true);
  const [columns, setColumns] = useState<number | null>(null);
  const [frequencyRange, setRange] = useState<FrequencyRange | null>(null);
  const spectrumRef = useRef<HTMLElement | null>(null);

  const setPlotWidth = useCallback((cssWidth: number) => {
    setColumns(columnsForWidth(cssWidth, typeof window === 'undefined' ? 1 : window.devicePixelRatio));
  }, []);

  const setFrequencyRange = useCallback((range: FrequencyRange | null) => {
    setRange((current) => {
      if (range === null || current === null) return range === current ? current : range;
      return current.min === range.min && current.max === range.max ? current : range;
    });
  }, []);

  const setChannel = useCallback((next: number) => {
    setChannelState(next);
  }, []);

  const setCheck = useCallback((next: string | null, nextChannel: number) => {
    setCheckId(next);
    setChannelState(nextChannel);
    // Another check's limits span other frequencies: start from its whole range.
    setRange(null);
  }, []);

  const showFrequency = useCallback(
    (hz: number) => {
      setFrequencyRange({ min: hz / 2, max: hz * 2 });
      const section = spectrumRef.current;
      if (section) {
        section.scrollIntoView?.({ behavior: 'smooth', block: 'start' });
        // Keyboard users land on the plot, where arrows and +/− keep exploring.
        section.querySelector<HTMLElement>('figure[tabindex]')?.focus({ preventScroll: true });
      }
    },
    [setFrequencyRange],
  );

  // The last-pass curve is always fetched when there is one; the toggle only hides it.
  const plotParams = useMemo<CapturePlotParams | null>(
    () => (columns === null ? null : { columns, channel, overlay: hasLastPassing ? 'last-passing' : 'none', check: checkId }),
    [columns, channel, hasLastPassing, checkId],
  );

  return {
    channel,
    setChannel,
    checkId,
    setCheck,
    showOverlay,
    setShowOverlay,
    plotParams,
    setPlotWidth,
    frequencyRange,
    setFrequencyRange,
    showFrequency,
    spectrumRef,
  };
}
