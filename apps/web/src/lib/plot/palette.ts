/**
 * Canvas colours for the capture plots. A canvas cannot use the CSS theme, so these repeat
 * the tokens of src/index.css (docs/design.md): ink for what was measured, brass for the
 * mask the measurement is held against, the fail colour only where a check failed.
 */
export const plotPalette = {
  ink950: '#11121b',
  ink900: '#1b1d2a',
  ink700: '#3b3f54',
  ink500: '#686d86',
  ink400: '#8a8ea6',
  ink300: '#aeb1c4',
  line: '#e5dfd3',
  lineStrong: '#d2c9b8',
  paperRaised: '#fffdf9',
  brass600: '#a86f1c',
  brass400: '#dca640',
  fail: '#c2411f',
  measuredBand: 'rgba(27, 29, 42, 0.20)',
  /** The lower limit: the mask's brass, darker and in another dash than the upper. */
  lowerLimit: '#6e4a10',
  /** The last passing capture: a blue of its own, dashed, never mistaken for the measured ink. */
  overlayLine: '#2f68a8',
  overlayBand: 'rgba(47, 104, 168, 0.10)',
  /** A band's measured level, drawn as a step over the band. */
  bandLevel: '#1b1d2a',
  allowedZone: 'rgba(220, 166, 64, 0.10)',
  failFill: 'rgba(194, 65, 31, 0.08)',
  failHatch: 'rgba(194, 65, 31, 0.30)',
  grid: 'rgba(27, 29, 42, 0.07)',
  gridMinor: 'rgba(27, 29, 42, 0.035)',
} as const;

export const plotFonts = {
  axis: '11px "JetBrains Mono", ui-monospace, monospace',
  label: '600 11px Inter, ui-sans-serif, system-ui, sans-serif',
} as const;
