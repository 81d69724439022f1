import type { EntityManager } from '@mikro-orm/postgresql';
import { AnalysisSettings, CAPTURE_PURGED, StimulusSpec, type DeriveMaskRequest, type DeriveMaskResponse, type DeriveWarning, type GoldenOutlierDto } from '@earmark/contracts';
import { Capture, type Project, type TestCase } from '@earmark/db';
import { DEFAULT_YIELD_GUARD_BANDS_DB, ENGINE_VERSION, deriveEnvelope, estimateYield, findGoldenOutliers, stimulusAsPlayed, type YieldEstimate } from '@earmark/dsp';
import { GoneError, ValidationError } from '../errors.js';
import type { CaptureAudioLoader } from './capture-audio.js';

/** Default smoothing of a derived envelope (1/6 octave): per-bin scatter would otherwise set σ. */
const DEFAULT_SMOOTHING = 6;

/**
 * Proposes a magnitude envelope from golden captures of one test case (mean ± (k·σ + guard),
 * simplified by Ramer–Douglas–Peucker; packages/dsp deriveEnvelope). Synchronous: 50 captures
 * of a few seconds decode and analyse in well under the request timeout.
 */
export class MaskDerivationService {
  constructor(private readonly audio: CaptureAudioLoader) {}

  async derive(em: EntityManager, project: Project, testCase: TestCase, req: DeriveMaskRequest): Promise<DeriveMaskResponse> {
    const captures = await em.find(Capture, { id: { $in: req.captureIds }, project, testCase }, { populate: ['target'] });
    const found = new Map(captures.map((c) => [c.id, c]));
    const missing = req.captureIds.map((id, i) => ({ id, i })).filter(({ id }) => !found.has(id));
    if (missing.length > 0) {
      throw new ValidationError(
        `${missing.length} of the captures are not captures of ${testCase.key} in ${project.key}: ${missing.map((m) => m.id).join(', ')}.`,
        missing.map(({ i }) => ({ path: `body.captureIds.${i}`, message: `not a capture of test case ${testCase.key}` })),
      );
    }
    const ordered = req.captureIds.map((id) => found.get(id) as Capture);
    const purged = ordered.filter((c) => c.purgedAt);
    if (purged.length > 0) {
      throw new GoneError(
        `The audio of ${purged.length} of the captures was removed by the retention policy (${purged.map((c) => c.id).join(', ')}); their verdicts are kept, but limits can only be derived from stored audio.`,
        CAPTURE_PURGED,
      );
    }
    const rates = new Set(ordered.map((c) => c.sampleRate));
    if (rates.size > 1) throw new ValidationError(`The golden captures must share one sample rate (got ${[...rates].join(', ')} Hz).`, [{ path: 'body.captureIds', message: 'mixed sample rates' }]);

    const spec = StimulusSpec.parse(testCase.stimulus);
    const settings = AnalysisSettings.parse(testCase.analysis);
    if (req.measure === 'transfer' && spec.kind === 'silence') throw new ValidationError('A transfer envelope needs a stimulus; this test case plays silence. Use measure "level".', [{ path: 'body.measure', message: 'no stimulus' }]);
    if (req.measure === 'level' && req.referenceHz !== undefined) throw new ValidationError('referenceHz applies only to measure "transfer".', [{ path: 'body.referenceHz', message: 'only for transfer' }]);
    const sampleRate = (ordered[0] as Capture).sampleRate;
    const bandHz = req.bandHz ?? settings.transferBandHz ?? [20, Math.min(20000, 0.95 * (sampleRate / 2))];
    const channel = req.channel ?? testCase.channelMap[0] ?? 0;
    const smoothing = req.smoothing ?? DEFAULT_SMOOTHING;

    const audio = [];
    for (const c of ordered) audio.push(await this.audio.load(c));
    let derived;
    try {
      derived = deriveEnvelope(
        {
          captures: audio,
          ...(spec.kind !== 'silence' ? { reference: stimulusAsPlayed(spec) } : {}),
          transferMethod: settings.transferMethod ?? (spec.kind === 'sweep' ? 'deconvolution' : 'h1'),
        },
        {
          measure: req.measure,
          ...(req.measure === 'transfer' && req.referenceHz !== undefined ? { referenceHz: req.referenceHz } : {}),
          smoothing,
          k: req.k,
          guardDb: req.guardDb,
          maxSegments: req.maxSegments,
          bandHz,
          channel,
          checkId: req.checkId,
        },
      );
    } catch (error) {
      // The engine's preconditions name what was wrong (a channel, the band, no stimulus energy).
      if (error instanceof RangeError) throw new ValidationError(`The limits cannot be derived: ${error.message}`, [{ path: 'body', message: error.message }]);
      throw error;
    }
    const targetOf = (c: Capture) => c.target.key;
    const outliers: GoldenOutlierDto[] = findGoldenOutliers(derived.hz, derived.curves, { bandsPerOctave: smoothing }).map((o) => {
      const capture = ordered[o.index] as Capture;
      return { captureId: capture.id, target: targetOf(capture), regions: o.regions, worst: o.worst };
    });
    return {
      yieldEstimate: yieldOf(derived.hz, derived.curves, req, smoothing),
      outliers,
      warnings: mixedTargetWarnings(ordered.map(targetOf)),
      check: derived.check,
      stats: {
        captures: ordered.length,
        channel,
        unit: derived.unit,
        ...derived.plot,
        pointsUsed: derived.hz.length,
        maxDeviationDb: derived.maxDeviationDb,
        maxStrayDb: derived.maxStrayDb,
        worstGoldenMarginDb: derived.worstGoldenMarginDb,
      },
      derivation: {
        captureIds: req.captureIds,
        k: req.k,
        guardDb: req.guardDb,
        maxSegments: req.maxSegments,
        smoothing,
        referenceHz: req.measure === 'transfer' ? (req.referenceHz === undefined ? 1000 : req.referenceHz) : null,
        measure: req.measure,
        channel,
        bandHz: [bandHz[0], bandHz[1]],
        engineVersion: ENGINE_VERSION,
        maxDeviationDb: derived.maxDeviationDb.overall,
        derivedAt: new Date().toISOString(),
      },
    };
  }
}

/**
 * The false-reject estimate of the proposal (packages/dsp estimateYield): at the requested guard
 * band and over 0…3 dB in 0.1 dB steps (extended in the same steps up to the requested guard band
 * when it is larger), so the wizard's slider needs no further request. Parametric bands are
 * 1/smoothing octave wide: the check's own smoothing is what makes neighbouring frequencies move together.
 */
function yieldOf(hz: Float64Array, curves: Float64Array[], req: DeriveMaskRequest, smoothing: number): YieldEstimate {
  const steps = Math.max(DEFAULT_YIELD_GUARD_BANDS_DB.length - 1, Math.ceil(req.guardDb * 10 - 1e-9));
  const guardBandsDb = Array.from({ length: steps + 1 }, (_, i) => i / 10);
  return estimateYield(hz, curves, { k: req.k, guardDb: req.guardDb, maxSegments: req.maxSegments, guardBandsDb, bandsPerOctave: smoothing });
}

/**
 * Golden captures of several targets are derived from anyway (one mask may deliberately cover
 * them), but never silently: the target-to-target difference then counts as unit spread.
 */
export function mixedTargetWarnings(targets: readonly string[]): DeriveWarning[] {
  const counts = new Map<string, number>();
  for (const t of targets) counts.set(t, (counts.get(t) ?? 0) + 1);
  if (counts.size < 2) return [];
  const keys = [...counts.keys()].sort();
  return [
    {
      code: 'mixed-targets',
      targets: keys,
      message: `The golden captures come from ${keys.length} targets: ${keys.map((k) => `${k} (${counts.get(k)})`).join(', ')}. Their differences count as unit-to-unit spread and widen the limits; derive from one target unless one mask should cover them all.`,
    },
  ];
}
