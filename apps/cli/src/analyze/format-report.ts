import type { AnalysisReport, ChannelAnalysis } from '@earmark/contracts';

const dash = '—';
const num = (v: number | null | undefined, digits: number, unit = ''): string => (v === null || v === undefined || !Number.isFinite(v) ? dash : `${v.toFixed(digits)}${unit}`);

function channelLines(c: ChannelAnalysis): string[] {
  const lines = [
    `channel ${c.channel}`,
    `  level          RMS ${num(c.rmsDbfs, 2, ' dBFS')}   peak ${num(c.peakDbfs, 2, ' dBFS')}   crest ${num(c.crestFactorDb, 2, ' dB')}`,
    `  integrity      DC ${c.dcOffset.toExponential(2)}   clipped ${c.clippedSamples}   dropouts ${c.dropouts.length}   discontinuities ${c.discontinuities.length}`,
    `  energy         time ${c.energy.time.toPrecision(10)}   frequency ${c.energy.frequency.toPrecision(10)}   rel. error ${c.energy.relativeError.toExponential(1)}`,
  ];
  lines.push(`  steady part    ${c.steadySeconds ? `${c.steadySeconds[0].toFixed(3)}…${c.steadySeconds[1].toFixed(3)} s (distortion and noise measured here)` : dash}`);
  if (c.fundamentalHz === null) lines.push('  tone           no dominant tone');
  else {
    lines.push(`  tone           ${num(c.fundamentalHz, 3, ' Hz')} at ${num(c.fundamentalDbfs, 2, ' dBFS')}`);
    lines.push(`  distortion     THD ${num(c.thdPercent, 4, ' %')}   THD+N ${num(c.thdnDb, 2, ' dB')} (${num(c.thdnPercent, 4, ' %')})`);
    lines.push(`  noise          SNR ${num(c.snrDb, 2, ' dB')}   SINAD ${num(c.sinadDb, 2, ' dB')}   ENOB ${num(c.enob, 2, ' bits')}`);
  }
  lines.push(`  noise floor    ${num(c.noiseFloorDbfs, 2, ' dBFS')}   A-weighted ${num(c.noiseFloorDbfsA, 2, ' dBFS')}`);
  lines.push('  1/3-octave bands (Hz: dBFS)');
  for (let i = 0; i < c.thirdOctaveBands.length; i += 6) {
    lines.push(`    ${c.thirdOctaveBands.slice(i, i + 6).map((b) => `${String(b.centerHz).padStart(6)}: ${num(b.levelDbfs, 1).padStart(7)}`).join('  ')}`);
  }
  const t = c.transfer;
  if (t) {
    lines.push(`  transfer (${t.method})`);
    lines.push(`    latency      ${t.latencySamples.toFixed(2)} samples (${t.latencyMs.toFixed(3)} ms)   polarity ${t.polarity}   drift ${num(t.driftPpm, 1, ' ppm')}`);
    if (t.coherenceMin !== null) lines.push(`    coherence    min γ² ${t.coherenceMin.toFixed(3)} over the band`);
    lines.push(`    band         ${t.bandHz ? `${t.bandHz[0].toFixed(1)}…${t.bandHz[1].toFixed(1)} Hz` : dash}`);
    lines.push(`    group delay  mean ${num(t.groupDelayMs.mean, 4, ' ms')}   max deviation ${num(t.groupDelayMs.maxDeviation, 4, ' ms')}`);
    lines.push(`    phase        max deviation from linear ${num(t.linearPhaseDeviationDeg, 2, '°')}`);
    lines.push('    |H| per 1/3 octave (Hz: dB)');
    for (let i = 0; i < t.magnitudeDb.length; i += 6) {
      lines.push(`      ${t.magnitudeDb.slice(i, i + 6).map((m) => `${String(m.centerHz).padStart(6)}: ${m.db.toFixed(2).padStart(7)}`).join('  ')}`);
    }
    if (t.distortionVsFrequency.length > 0) {
      lines.push('    distortion vs frequency (Hz: H2 % / H3 % / THD %)');
      for (const d of t.distortionVsFrequency) lines.push(`      ${String(d.centerHz).padStart(6)}: ${num(d.h2Percent, 4)} / ${num(d.h3Percent, 4)} / ${num(d.thdPercent, 4)}`);
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
