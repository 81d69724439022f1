import type { EntityManager } from '@mikro-orm/postgresql';
import { CapturePlot, JudgingSettings, MaskCheck, type AudioKind, type CaptureDetail, type MagnitudeEnvelopeCheck, type PlotQuery } from '@earmark/contracts';
import { Capture, type MaskRevision, type Project } from '@earmark/db';
import { type ObjectStore } from '@earmark/platform';
import { ENGINE_VERSION, MaskCheckError, captureCurves, encodeWav, listeningResidual, maskPlotData, stimulusAsPlayed, type DecodedAudio } from '@earmark/dsp';
import { NotFoundError } from '../errors.js';
import { storedSettingsFor } from '../judging/judging-settings.js';
import { CaptureAudioLoader } from './capture-audio.js';
import { buildSummary } from './builds-query.service.js';
import { presentCaptures } from './capture-presenter.js';
import type { FindingsService } from './findings.service.js';
import type { Links } from './links.js';
import { newestVerdict, newestVerdictSql } from '../repositories/verdicts.js';

type LoadedCapture = Capture;

/** Capture page data: details, decimated plot data and audio for listening. */
export class CaptureViewService {
  /** Shared with other services that decode stored captures (mask derivation). */
  readonly audioLoader: CaptureAudioLoader;

  constructor(
    private readonly objectStore: ObjectStore,
    private readonly findings: FindingsService,
    private readonly links: Links,
  ) {
    this.audioLoader = new CaptureAudioLoader(objectStore);
  }

  async load(em: EntityManager, project: Project, id: string): Promise<LoadedCapture> {
    const capture = await em.findOne(Capture, { id, project }, { populate: ['project', 'build', 'testCase', 'target'] });
    if (!capture) throw new NotFoundError(`There is no capture ${id} in ${project.key}.`);
    return capture;
  }

  /** The mask the capture was judged against (its newest verdict's revision). */
  private async judgedMask(em: EntityManager, capture: Capture): Promise<MaskRevision | null> {
    const verdict = await newestVerdict(em, capture, ['maskRevision']);
    return verdict?.maskRevision ?? null;
  }

  /**
   * The settings the capture was judged with (its newest verdict's record, else its revision's;
   * the test case's own before any verdict), so the page draws what the verdict measured.
   */
  private async judgedSettings(em: EntityManager, capture: Capture): Promise<JudgingSettings> {
    const verdict = await newestVerdict(em, capture, ['maskRevision']);
    return JudgingSettings.parse(verdict?.settings ?? storedSettingsFor(capture.testCase, verdict?.maskRevision ?? null));
  }

  private async lastPassing(em: EntityManager, capture: Capture): Promise<CaptureDetail['lastPassing']> {
    const rows = await em.getConnection().execute<{ id: string; sha: string; created_at: Date }[]>(
      `select c.id, b.sha, c.created_at from capture c join build b on b.id = c.build_id
        where c.test_case_id = ? and c.target_id = ? and b.created_at < ? and c.status = 'done'
          and ${newestVerdictSql('c.id')} = 'pass'
        order by b.created_at desc limit 1`,
      [capture.testCase.id, capture.target.id, capture.build.createdAt],
    );
    const row = rows[0];
    return row ? { captureId: row.id, buildSha: row.sha, createdAt: new Date(row.created_at).toISOString() } : null;
  }

  async detail(em: EntityManager, project: Project, id: string, me: Parameters<FindingsService['list']>[3]): Promise<CaptureDetail> {
    const capture = await this.load(em, project, id);
    const [dto] = await presentCaptures(em, [capture], this.links);
    const mask = await this.judgedMask(em, capture);
    const findings = await this.findings.list(em, project, { page: 1, pageSize: 200, captureId: capture.id }, me);
    return {
      capture: dto!,
      testCase: { key: capture.testCase.key, name: capture.testCase.name, stimulusKind: String(capture.testCase.stimulus.kind ?? '') },
      target: { key: capture.target.key, name: capture.target.name },
      build: await buildSummary(em, project, capture.build.id),
      mask: mask ? { id: mask.id, revision: mask.revision, checks: mask.checks.map((c) => MaskCheck.parse(c)) } : null,
      findings: findings.items,
      lastPassing: await this.lastPassing(em, capture),
    };
  }

  private audioOf(capture: Capture): Promise<DecodedAudio> {
    return this.audioLoader.load(capture);
  }

  /**
   * Plot data, cached in the object store: the key names everything the answer depends on
   * (capture, mask revision judged against, engine version, columns, channel, overlay
   * capture), so a new verdict or a newer passing capture simply misses the cache. The
   * cache is shared by every API process and is only an optimisation: any failure to read
   * or write it falls back to computing.
   */
  async plot(em: EntityManager, project: Project, id: string, q: PlotQuery): Promise<CapturePlot> {
    const capture = await this.load(em, project, id);
    const mask = await this.judgedMask(em, capture);
    const passing = q.overlay === 'last-passing' ? await this.lastPassing(em, capture) : null;
    const key = `plot-cache/${capture.id}/${ENGINE_VERSION}-${mask?.id ?? 'none'}-${q.columns}-${q.channel ?? 'd'}-${passing?.captureId ?? 'none'}.json`;
    const cached = await this.objectStore
      .get(key)
      .then((bytes) => CapturePlot.parse(JSON.parse(bytes.toString('utf8'))))
      .catch(() => null);
    if (cached) return cached;
    const plot = await this.computePlot(em, project, id, q);
    void this.objectStore.put(key, Buffer.from(JSON.stringify(plot)), 'application/json').catch(() => {});
    return plot;
  }

  private async computePlot(em: EntityManager, project: Project, id: string, q: PlotQuery): Promise<CapturePlot> {
    const capture = await this.load(em, project, id);
    const audio = await this.audioOf(capture);
    const { stimulus: spec, analysis: settings, channelMap } = await this.judgedSettings(em, capture);
    const hasSignal = spec.kind !== 'silence';
    const reference = hasSignal ? stimulusAsPlayed(spec) : undefined;
    const channel = Math.min(q.channel ?? channelMap[0] ?? 0, audio.channels.length - 1);
    const mask = await this.judgedMask(em, capture);
    const envelope = (mask?.checks ?? []).map((c) => MaskCheck.parse(c)).find((c): c is MagnitudeEnvelopeCheck => c.kind === 'magnitude-envelope') ?? null;
    const nyquist = audio.sampleRate / 2;
    // Without an envelope check, draw the plain spectrum over the audio band (a limit far out of view).
    const check: MagnitudeEnvelopeCheck =
      envelope ??
      MaskCheck.parse({ id: 'spectrum', kind: 'magnitude-envelope', measure: reference ? 'transfer' : 'level', upper: [{ hz: 20, db: 400 }, { hz: Math.min(20000, nyquist * 0.98), db: 400 }] }) as MagnitudeEnvelopeCheck;
    const transferMethod = settings.transferMethod ?? (spec.kind === 'sweep' ? 'deconvolution' : 'h1');
    const input = { capture: audio, ...(reference ? { reference } : {}), transferMethod } as const;
    // One capture context: the spectrum, phase and group delay drawn are what the verdict used.
    // When no transfer function can be estimated (the capture misses part of the stimulus), the
    // verdict says why; the page still draws the capture's own level spectrum.
    let drawn: MagnitudeEnvelopeCheck | null = envelope;
    let plotted = check;
    let curves: ReturnType<typeof captureCurves>;
    try {
      curves = captureCurves(input, check, { columns: q.columns, channel });
    } catch (error) {
      if (!(error instanceof MaskCheckError)) throw error;
      drawn = null;
      const level = MaskCheck.parse({ id: 'spectrum', kind: 'magnitude-envelope', measure: 'level', upper: [{ hz: 20, db: 400 }, { hz: Math.min(20000, nyquist * 0.98), db: 400 }] }) as MagnitudeEnvelopeCheck;
      plotted = level;
      curves = captureCurves(input, level, { columns: q.columns, channel });
    }
    const data = curves.spectrum;
    const series = (d: typeof data) => ({ hz: d.hz, min: d.measuredMin, max: d.measuredMax });

    let overlay: CapturePlot['overlay'] = null;
    const passing = q.overlay === 'last-passing' ? await this.lastPassing(em, capture) : null;
    if (passing) {
      const other = await this.load(em, project, passing.captureId);
      // The last pass is drawn the same way; when it cannot be, the page simply has no overlay.
      const otherData = await this.audioOf(other).then((audio) => maskPlotData({ ...input, capture: audio }, plotted, { columns: q.columns, channel: Math.min(channel, other.channelCount - 1) })).catch((error: unknown) => {
        if (error instanceof MaskCheckError) return null;
        throw error;
      });
      if (otherData) overlay = { captureId: other.id, buildSha: passing.buildSha, spectrum: series(otherData) };
    }

    let worst: CapturePlot['worst'] = null;
    for (const r of data.failingRegions) if (!worst || r.worstMarginDb < worst.margin) worst = { hz: r.worstHz, db: r.worstDb, margin: r.worstMarginDb };
    return {
      channel,
      checkId: drawn ? drawn.id : null,
      unit: data.unit,
      spectrum: series(data),
      upper: drawn ? data.upper : null,
      lower: drawn ? data.lower : null,
      failingRegions: data.failingRegions.map((r) => ({ fromHz: r.fromHz, toHz: r.toHz, worstHz: r.worstHz, worstMargin: r.worstMarginDb })),
      worst,
      overlay,
      phase: curves.phase,
      groupDelay: curves.groupDelay,
      waveform: curves.waveform,
      engineVersion: ENGINE_VERSION,
    };
  }

  /** WAV (32-bit float) of the capture, its stimulus, or the residual: what the firmware changed. */
  async audio(em: EntityManager, project: Project, id: string, kind: AudioKind): Promise<Uint8Array> {
    const capture = await this.load(em, project, id);
    const spec = (await this.judgedSettings(em, capture)).stimulus;
    if (kind === 'stimulus') {
      const s = stimulusAsPlayed(spec);
      return encodeWav(s.channels, s.sampleRate, { encoding: 'float', bitsPerSample: 32 });
    }
    const audio = await this.audioOf(capture);
    if (kind === 'capture') return encodeWav(audio.channels, audio.sampleRate, { encoding: 'float', bitsPerSample: 32 });
    const residual = listeningResidual(audio, spec.kind === 'silence' ? null : stimulusAsPlayed(spec), spec.kind);
    return encodeWav(residual, audio.sampleRate, { encoding: 'float', bitsPerSample: 32 });
  }
}
