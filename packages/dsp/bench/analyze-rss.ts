// Child process of the benchmark: one full analyze of a synthetic 10 s 48 kHz stereo capture,
// then prints the process's peak resident set size. Run with `node --import tsx`.
import { analyzeCapture } from '../src/index.js';
import { makeCapture } from './capture.js';

const mode = process.argv[2] ?? 'analyze';
const before = process.resourceUsage().maxRSS;
const capture = makeCapture();
const afterInput = process.resourceUsage().maxRSS;
if (mode === 'analyze') analyzeCapture(capture);
const peak = process.resourceUsage().maxRSS;
// maxRSS is in KiB
process.stdout.write(JSON.stringify({ startKiB: before, inputKiB: afterInput, peakKiB: peak }) + '\n');
