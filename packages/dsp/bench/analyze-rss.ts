// Child process of the benchmark: one full analyze in a fresh process, then the process's peak
// resident set size (and, for the large case, the analysis time). Run with `node --import tsx`.
// Modes: baseline (input only), analyze (10 s 48 kHz stereo), sweep8 (10 s 192 kHz 8 channels, sweep reference).
import { analyzeCapture } from '../src/index.js';
import { makeCapture } from './capture.js';
import { makeSweepCapture } from './sweep-capture.js';

const mode = process.argv[2] ?? 'analyze';
const before = process.resourceUsage().maxRSS;
if (mode === 'sweep8') {
  const { capture, reference } = makeSweepCapture();
  const afterInput = process.resourceUsage().maxRSS;
  const t = process.hrtime.bigint();
  analyzeCapture(capture, { reference });
  const seconds = Number(process.hrtime.bigint() - t) / 1e9;
  process.stdout.write(JSON.stringify({ startKiB: before, inputKiB: afterInput, peakKiB: process.resourceUsage().maxRSS, seconds }) + '\n');
} else {
  const capture = makeCapture();
  const afterInput = process.resourceUsage().maxRSS;
  if (mode === 'analyze') analyzeCapture(capture);
  const peak = process.resourceUsage().maxRSS;
  // maxRSS is in KiB
  process.stdout.write(JSON.stringify({ startKiB: before, inputKiB: afterInput, peakKiB: peak }) + '\n');
}
