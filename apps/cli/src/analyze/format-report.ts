import { DASH, formatDecibels, formatDegrees, formatLevel, formatMilliseconds, formatNumberIn, formatPercent, type AnalysisReport, type ChannelAnalysis } from '@earmark/contracts';

const dash = DASH;
// Diagnostic figures without a shared rule (Hz of a detected tone, ppm, bits) keep the precision the engine report needs.
const num = (v: number | null | undefined, digits: number, unit = ''): string => (v === null || v === undefined || !Number.isFinite(v) ? dash : `${v.toFixed(digits)}${unit}`);

function channelLines(c: ChannelAnalysis): string[] {
  const lines = [
    `channel ${c.channel}`,
    `  level          RMS ${formatLevel(c.rmsDbfs)}   peak ${formatLevel(c.peakDbfs)}   crest ${formatDecibels(c.crestFactorDb)}`,
    `  integrity      DC ${formatNumberIn(c.dcOffset, 'FS')}   clipped ${c.clippedSamples}   dropouts ${c.dropouts.length}   discontinuities ${c.discontinuities.length}`,
    `  energy         time ${c.energy.time.toPrecision(10)}   frequency ${c.energy.frequency.toPrecision(10)}   rel. error ${c.energy.relativeError.toExponential(1)}`,
  ];
  lines.push(`  steady part    ${c.steadySeconds ? `${formatNumberIn(c.steadySeconds[0], 's')}…${formatNumberIn(c.steadySeconds[1], 's')} s (distortion and noise measured here)` : dash}`);
  if (c.fundamentalHz === null) lines.push('  tone           no dominant tone');
  else {
    lines.push(`  tone           ${num(c.fundamentalHz, 3, ' Hz')} at ${formatLevel(c.fundamentalDbfs)}`);
    lines.push(`  distortion     THD ${formatPercent(c.thdPercent)}   THD+N ${formatDecibels(c.thdnDb)} (${formatPercent(c.thdnPercent)})`);
    lines.push(`  noise          SNR ${formatDecibels(c.snrDb)}   SINAD ${formatDecibels(c.sinadDb)}   ENOB ${num(c.enob, 2, ' bits')}`);
  }
  lines.push(`  noise floor    ${formatLevel(c.noiseFloorDbfs)}   A-weighted ${formatLevel(c.noiseFloorDbfsA)}`);
  lines.push('  1/3-octave bands (Hz: dBFS)');
  for (let i = 0; i < c.thirdOctaveBands.length; i += 6) {
    lines.push(`    ${c.thirdOctaveBands.slice(i, i + 6).map((b) => `${String(b.centerHz).padStart(6)}: ${formatNumberIn(b.levelDbfs, 'dBFS').padStart(7)}`).join('  ')}`);
  }
  const t = c.transfer;
  if (t) {
    lines.push(`  transfer (${t.method})`);
    lines.push(`    latency      ${t.latencySamples.toFixed(2)} samples (${formatMilliseconds(t.latencyMs)})   polarity ${t.polarity}   drift ${num(t.driftPpm, 1, ' ppm')}`);
    if (t.coherenceMin !== null) lines.push(`    coherence    min γ² ${t.coherenceMin.toFixed(3)} over the band`);
    lines.push(`    band         ${t.bandHz ? `${t.bandHz[0].toFixed(1)}…${t.bandHz[1].toFixed(1)} Hz` : dash}`);
    lines.push(`    group delay  mean ${formatMilliseconds(t.groupDelayMs.mean)}   max deviation ${formatMilliseconds(t.groupDelayMs.maxDeviation)}`);
    lines.push(`    phase        max deviation from linear ${formatDegrees(t.linearPhaseDeviationDeg)}`);
    lines.push('    |H| per 1/3 octave (Hz: dB)');
    for (let i = 0; i < t.magnitudeDb.length; i += 6) {
      lines.push(`      ${t.magnitudeDb.slice(i, i + 6).map((m) => `${String(m.centerHz).padStart(6)}: ${formatNumberIn(m.db, 'dB').padStart(7)}`).join('  ')}`);
    }
    if (t.distortionVsFrequency.length > 0) {
      lines.push('    distortion vs frequency (Hz: H2 % / H3 % / THD %)');
      for (const d of t.distortionVsFrequency) lines.push(`      ${String(d.centerHz).padStart(6)}: ${formatNumberIn(d.h2Percent, '%')} / ${formatNumberIn(d.h3Percent, '%')} / ${formatNumberIn(d.thdPercent, '%')}`);
    }
  }
  if (c.warnings.length > 0) {
    lines.push('  warnings');
    for (const w of c.warnings) lines.push(`    - ${w}`);
  }
  return lines;
}

/** The readable form of an analyze report (the `--json` form is the report itself). */
export function formatReport(report: AnalysisReport, source: string): string {
  const head = [
    `${source}: ${report.frames} frames at ${report.sampleRate} Hz, engine ${report.engineVersion}`,
    'levels in dBFS: a full-scale sine reads 0 dBFS RMS (AES17)',
  ];
  return [...head, ...report.channels.flatMap((c) => ['', ...channelLines(c)])].join('\n') + '\n';
}
