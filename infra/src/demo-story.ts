import { createHash } from 'node:crypto';
import { DEMO_HISTORY_DAYS } from '@earmark/db';

/**
 * Fernwick's six weeks on Kestrel Buds, as data: which build was made when, on which branch,
 * and what its captures sound like. Pure and deterministic (no clock, no randomness here);
 * `demo-captures.ts` turns each capture into audio, `demo-builds.ts` sends it through the API.
 *
 * The story, oldest first:
 * - main, nightly 388–398: quiet weeks. Each nightly is measured on one of five EVT2 units that
 *   take turns on the rig, so the passing captures differ by component tolerance (the golden
 *   set the derive wizard learns from). A DVT1 board joins the rig at nightly 396; its idle
 *   noise sits above the limit, which an approved waiver accepts until the DVT2 respin.
 * - nightly 399: the EQ's coefficients were quantised to 16 bits, which raised a peak near
 *   12.5 kHz out of the envelope; the first voice-uplink capture errors (its mask is not agreed).
 *   Fixed in nightly 400.
 * - feature/limiter-retune: a faster limiter lets the bass onset overshoot and clip; the third
 *   build fixes it.
 * - nightly 402: the rig's recorder stopped after one second, so the analysis cannot run.
 * - nightly 404–411: the adaptive bass EQ creeps up build after build; the margin of the response
 *   envelope near 70 Hz shrinks until the last two nightlies fail.
 * - feature/ble-buffers: larger audio blocks for BLE push the latency over its 10 ms limit.
 * Afterwards (demo-workflow.ts): the DVT1 waiver is requested and approved, and a stricter
 * level.tone.997 revision is submitted for review with its impact computed.
 */

export type TestCaseKey = 'eq.music.sweep' | 'level.tone.997' | 'noise.idle' | 'voice.uplink.sweep';
export type TargetKey = 'evt2-48k' | 'dvt1-48k';

/** What the firmware and the rig did to one capture. */
export type CaptureShape =
  | { kind: 'clean' }
  /** EQ coefficients quantised: a narrow peak of `gainDb` at `hz`. */
  | { kind: 'quantised-eq'; hz: number; gainDb: number }
  /** The limiter's attack lets the first `seconds` (the sweep's bass onset) through `overshootDb` too loud, into full scale. */
  | { kind: 'limiter-overshoot'; seconds: number; overshootDb: number }
  /** The adaptive bass EQ's boost at 70 Hz. */
  | { kind: 'bass-creep'; gainDb: number }
  /** End-to-end latency of the audio path. */
  | { kind: 'latency'; ms: number }
  /** The recorder stopped after `seconds`. */
  | { kind: 'truncated'; seconds: number }
  /** The DVT1 board's regulator hiss. */
  | { kind: 'hiss'; dbfs: number };

export interface DemoCapture {
  testCase: TestCaseKey;
  target: TargetKey;
  /** Which rig unit was measured: its component tolerances shape the response. */
  unit: string;
  shape: CaptureShape;
}

export interface DemoBuild {
  sha: string;
  branch: string;
  label: string;
  /** How long before the seeding the build was made. */
  hoursAgo: number;
  captures: DemoCapture[];
}

/** The first nightly of the history and how many there are. */
const FIRST_NIGHTLY = 388;
const NIGHTLIES = 24;
const EVT2_UNITS = ['K-01', 'K-02', 'K-03', 'K-04', 'K-05'] as const;
/** One DVT1 unit reaches the rig (the board is scarce). */
const DVT1_UNIT = 'D-11';
/** The DVT1 unit reaches the rig with this nightly. */
const DVT1_FROM = 396;
/** The adaptive bass EQ's boost per nightly, from nightly 404 on (dB at 70 Hz). */
const BASS_CREEP_DB = [0.5, 0.7, 0.9, 1.1, 1.3, 1.5, 1.7, 1.9] as const;
const BASS_CREEP_FROM = 404;

/** The newest main nightly keeps the SHA older tests and the plot benchmark know it by. */
const PINNED_SHAS: Record<string, string> = { 'nightly 411': 'd19b3f8e44' };

/** A stable, fictional 10-digit commit SHA for a build label. */
export const demoSha = (label: string): string => PINNED_SHAS[label] ?? createHash('sha256').update(`fernwick/${label}`).digest('hex').slice(0, 10);

const clean: CaptureShape = { kind: 'clean' };
const at = (testCase: TestCaseKey, target: TargetKey, unit: string, shape: CaptureShape = clean): DemoCapture => ({ testCase, target, unit, shape });

function nightly(index: number): DemoBuild {
  const n = FIRST_NIGHTLY + index;
  const unit = EVT2_UNITS[index % EVT2_UNITS.length]!;
  const creep = n >= BASS_CREEP_FROM ? BASS_CREEP_DB[n - BASS_CREEP_FROM] : undefined;
  const sweepShape: CaptureShape =
    n === 399 ? { kind: 'quantised-eq', hz: 12_500, gainDb: 2.6 } : n === 402 ? { kind: 'truncated', seconds: 1 } : creep !== undefined ? { kind: 'bass-creep', gainDb: creep } : clean;
  const captures = [at('eq.music.sweep', 'evt2-48k', unit, sweepShape), at('level.tone.997', 'evt2-48k', unit), at('noise.idle', 'evt2-48k', unit)];
  if (n >= DVT1_FROM) {
    const dvtSweep = creep !== undefined ? ({ kind: 'bass-creep', gainDb: creep } as const) : clean;
    captures.push(at('eq.music.sweep', 'dvt1-48k', DVT1_UNIT, dvtSweep), at('noise.idle', 'dvt1-48k', DVT1_UNIT, { kind: 'hiss', dbfs: -94.6 }));
  }
  if (n === 399) captures.push(at('voice.uplink.sweep', 'evt2-48k', unit));
  const label = `nightly ${n}`;
  // One nightly every 42 hours, give or take half an hour; the oldest DEMO_HISTORY_DAYS − 0.5 days ago.
  const hoursAgo = (DEMO_HISTORY_DAYS - 0.5) * 24 - index * 42 - (index % 3) * 0.4;
  return { sha: demoSha(label), branch: 'main', label, hoursAgo, captures };
}

function branchBuild(branch: string, label: string, hoursAgo: number, captures: DemoCapture[]): DemoBuild {
  return { sha: demoSha(label), branch, label, hoursAgo, captures };
}

const LIMITER = 'feature/limiter-retune';
const BLE = 'feature/ble-buffers';

/** Every build of the demo, oldest first. */
export const DEMO_BUILDS: readonly DemoBuild[] = [
  ...Array.from({ length: NIGHTLIES }, (_, i) => nightly(i)),
  branchBuild(LIMITER, 'limiter: faster attack', 21 * 24 + 5, [
    at('eq.music.sweep', 'evt2-48k', 'K-02', { kind: 'limiter-overshoot', seconds: 0.08, overshootDb: 13 }),
    at('level.tone.997', 'evt2-48k', 'K-02'),
  ]),
  branchBuild(LIMITER, 'limiter: softer knee', 19 * 24 + 7, [
    at('eq.music.sweep', 'evt2-48k', 'K-02', { kind: 'limiter-overshoot', seconds: 0.04, overshootDb: 12.5 }),
    at('level.tone.997', 'evt2-48k', 'K-02'),
  ]),
  branchBuild(LIMITER, 'limiter: look-ahead 1 ms', 17 * 24 + 3, [at('eq.music.sweep', 'evt2-48k', 'K-04'), at('level.tone.997', 'evt2-48k', 'K-04')]),
  branchBuild(BLE, 'ble: split audio task', 8 * 24 + 6, [at('eq.music.sweep', 'evt2-48k', 'K-01'), at('level.tone.997', 'evt2-48k', 'K-01')]),
  branchBuild(BLE, 'ble: 256-sample blocks', 5 * 24 + 2, [at('eq.music.sweep', 'evt2-48k', 'K-03', { kind: 'latency', ms: 12.5 }), at('level.tone.997', 'evt2-48k', 'K-03')]),
  branchBuild(BLE, 'ble: 192-sample blocks', 2 * 24 + 9, [at('eq.music.sweep', 'evt2-48k', 'K-05', { kind: 'latency', ms: 11.2 }), at('level.tone.997', 'evt2-48k', 'K-05')]),
].sort((a, b) => b.hoursAgo - a.hoursAgo);

/** Labels the story and its test refer to. */
export const DEMO_MOMENTS = {
  quantisedEq: 'nightly 399',
  eqFixed: 'nightly 400',
  recorderStopped: 'nightly 402',
  bassCreep: Array.from({ length: BASS_CREEP_DB.length }, (_, i) => `nightly ${BASS_CREEP_FROM + i}`),
  newestMain: `nightly ${FIRST_NIGHTLY + NIGHTLIES - 1}`,
  limiterBranch: LIMITER,
  bleBranch: BLE,
} as const;
