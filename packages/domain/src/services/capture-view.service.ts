import { Readable } from 'node:stream';
import type { EntityManager } from '@mikro-orm/postgresql';
import { JudgingSettings, MaskCheck, RAW_FLOAT32_MEDIA_TYPE, plotChannelFor, type AudioKind, type CaptureDetail, type CapturePlot, type PlotCheckResult, type PlotQuery } from '@earmark/contracts';
import { Capture, CheckResult, type MaskRevision, type Project, type Verdict } from '@earmark/db';
import { type ObjectStore } from '@earmark/platform';
import { decodeRefusalOf, plotRefusalOf } from '../compute/compute-errors.js';
import { ownBuffer } from '../compute/views-compute.js';
import { DEFAULT_MAX_PLOT_SAMPLES, type ViewsCompute } from '../compute/views-tasks.js';
import { GoneError, NotFoundError, UnsupportedCaptureError, ValidationError } from '../errors.js';
import { assertAudioStored } from '../lifecycle/purged-capture.js';
import { storedSettingsFor } from '../judging/judging-settings.js';
import { plotKey, readStoredPlot, writeStoredPlot, type PlotIdentity, type StoredPlot } from '../plots/plot-store.js';
import { isSpectralCheck, plotChannel, plotCheck, type CapturePlotCore, type SpectralCheck } from '../plots/render-capture-plot.js';
import { defaultPlotView, plotCheckResult } from '../plots/plot-view.js';
import { SingleFlight } from '../util/single-flight.js';
import { storedFormatOf } from '../judging/judge-capture.js';
import { CaptureAudioLoader } from './capture-audio.js';
import type { StimulusFiles, WavStream } from './stimulus-files.js';
import { buildSummary } from './builds-query.service.js';
import { presentCaptures } from './capture-presenter.js';
import type { FindingsService } from './findings.service.js';
import type { Links } from './links.js';
import { newestVerdict } from '../repositories/verdicts.js';
import { lastPassingCapture } from '../repositories/last-passing.js';

type LoadedCapture = Capture;

/** The verdict's check results as the plot rule reads them. */
async function verdictPlotResults(em: EntityManager, verdict: Verdict): Promise<PlotCheckResult[]> {
  const rows = await em.find(CheckResult, { verdict: verdict.id });
  return rows.map((c) => plotCheckResult(c.checkId, c.pass, c.margin, c.details));
}

/** Capture page data: details, decimated plot data and audio for listening. */
export class CaptureViewService {
  /** Shared with other services that decode stored captures (mask derivation). */
  readonly audioLoader: CaptureAudioLoader;

  /** Plots being computed in this process, so two views of a new capture compute it once. */
  private readonly computing = new SingleFlight<StoredPlot>();

  constructor(
    private readonly objectStore: ObjectStore,
    private readonly findings: FindingsService,
    private readonly links: Links,
    private readonly compute: ViewsCompute,
    private readonly stimuli: StimulusFiles,
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

  private lastPassing(em: EntityManager, capture: Capture): Promise<CaptureDetail['lastPassing']> {
    return lastPassingCapture(em, { projectId: capture.project.id, testCaseId: capture.testCase.id, targetId: capture.target.id, before: capture.build.createdAt });
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

  /**
   * Plot data, stored in the object store under a key naming everything it depends on (capture,
   * mask revision judged against, engine version, columns, channel): a view reads the stored plot
   * and computes (in a compute thread) only on a miss. A capture that cannot be plotted stores
   * its refusal, so the next view answers the same 422 at once. The last-passing overlay is the
   * other capture's own stored plot, looked up only after the main plot is in hand.
   */
  async plot(em: EntityManager, project: Project, id: string, q: PlotQuery): Promise<CapturePlot> {
    const capture = await this.load(em, project, id);
    const main = await this.storedPlot(em, capture, await newestVerdict(em, capture, ['maskRevision']), q.columns, q.channel, { id: q.check, strict: true });
    const overlay = q.overlay === 'last-passing' ? await this.overlayFor(em, project, capture, main, q.columns) : null;
    return { ...main, overlay };
  }

  private async overlayFor(em: EntityManager, project: Project, capture: Capture, main: CapturePlotCore, columns: number): Promise<CapturePlot['overlay']> {
    const passing = await this.lastPassing(em, capture);
    if (!passing) return null;
    const other = await this.load(em, project, passing.captureId);
    try {
      // The same check when the last pass was judged with it too, else its mask's default: the curve is what is compared.
      const plot = await this.storedPlot(em, other, await newestVerdict(em, other, ['maskRevision']), columns, main.channel, { id: main.checkId ?? undefined, strict: false });
      // Curves in different units (one drew its level, the other its transfer) do not share an axis.
      return plot.unit === main.unit ? { captureId: other.id, buildSha: passing.buildSha, spectrum: plot.spectrum } : null;
    } catch (error) {
      // The last pass is drawn the same way; when it cannot be, the page simply has no overlay.
      if (error instanceof UnsupportedCaptureError || error instanceof NotFoundError || error instanceof GoneError) return null;
      throw error;
    }
  }

  /**
   * The stored plot of a capture, computed and stored first on a miss. Without a check asked for
   * (or when a non-strict one is not in the mask) it draws the view the capture page opens on,
   * the worst failing spectral check (`defaultPlotView`); without a channel, the drawn check's
   * worst channel — the same view the worker stored after the verdict.
   * @throws UnsupportedCaptureError (stored refusal); ValidationError when `strict` and the check asked for is no spectral check of the mask
   */
  private async storedPlot(
    em: EntityManager,
    capture: Capture,
    verdict: Verdict | null,
    columns: number,
    askedChannel: number | undefined,
    askedCheck: { id: string | undefined; strict: boolean },
  ): Promise<CapturePlotCore> {
    const settings = JudgingSettings.parse(verdict?.settings ?? storedSettingsFor(capture.testCase, verdict?.maskRevision ?? null));
    const mask = verdict?.maskRevision ?? null;
    const checks = (mask?.checks ?? []).map((c) => MaskCheck.parse(c));
    let check: SpectralCheck | null | undefined = askedCheck.id === undefined ? undefined : plotCheck(checks, askedCheck.id);
    if (check === null) {
      if (askedCheck.strict) {
        const spectral = checks.filter(isSpectralCheck).map((c) => c.id);
        throw new ValidationError(
          `Check "${askedCheck.id}" is not a spectral check of the mask capture ${capture.id} was judged against; ${spectral.length ? `its spectral checks are ${spectral.join(', ')}` : 'that mask has no spectral check'}.`,
          [{ path: 'check', message: spectral.length ? `choose one of ${spectral.join(', ')}` : 'the mask has no spectral check' }],
        );
      }
      check = undefined;
    }
    // Read only when a default is to be chosen: the page asks with both, and then this costs no query.
    const results = verdict && (check === undefined || askedChannel === undefined) ? await verdictPlotResults(em, verdict) : [];
    if (check === undefined) {
      const view = defaultPlotView(checks, results, settings.channelMap, capture.channelCount);
      check = view.checkId === null ? null : plotCheck(checks, view.checkId);
    }
    const channel = askedChannel ?? plotChannelFor(check, results.find((r) => r.id === check?.id) ?? null, { channelMap: settings.channelMap, channelCount: capture.channelCount });
    const identity: PlotIdentity = { captureId: capture.id, maskRevisionId: mask?.id ?? null, columns, channel: plotChannel(channel, settings, capture.channelCount), checkId: check?.id ?? null };
    const stored = (await readStoredPlot(this.objectStore, identity)) ?? (await this.computing.run(plotKey(identity), () => this.computePlot(capture, identity, settings, mask)));
    if ('refusal' in stored) throw new UnsupportedCaptureError(stored.refusal.detail, stored.refusal.code);
    return stored.plot;
  }

  private async computePlot(capture: Capture, identity: PlotIdentity, settings: JudgingSettings, mask: MaskRevision | null): Promise<StoredPlot> {
    // A purged capture answers 410 for every plot not stored, however large it was.
    assertAudioStored(capture);
    const samples = capture.frames * capture.channelCount;
    const maxSamples = this.compute.maxPlotSamples ?? DEFAULT_MAX_PLOT_SAMPLES;
    if (samples > maxSamples) {
      // Not stored: the worker's default plot may still arrive under another key, and a raised limit should apply at once.
      return {
        refusal: {
          code: 'plot-too-large',
          detail: `Capture ${capture.id} has ${samples.toLocaleString('en-US')} samples; plots other than the default one are drawn for captures of up to ${maxSamples.toLocaleString('en-US')} samples (EARMARK_API_PLOT_MAX_SAMPLES).`,
        },
      };
    }
    const bytes = await this.audioLoader.bytes(capture);
    const checks = (mask?.checks ?? []).map((c) => MaskCheck.parse(c));
    let stored: StoredPlot;
    try {
      const input = { bytes, format: storedFormatOf(capture), settings, checks, columns: identity.columns, channel: identity.channel, checkId: identity.checkId };
      stored = { plot: await this.compute.run('renderPlot', input, ownBuffer(bytes)) };
    } catch (error) {
      const refusal = plotRefusalOf(error, capture.id);
      if (!refusal) throw error;
      stored = { refusal };
    }
    await writeStoredPlot(this.objectStore, identity, stored);
    return stored;
  }

  /**
   * The capture exactly as uploaded, byte for byte from the object store, with a file name people
   * can keep (`<test case>_<target>_<sha7>.wav`, `.f32` for a raw float upload).
   * @throws GoneError (410) when the retention policy removed it; NotFoundError; ServiceUnavailableError (503)
   */
  async original(em: EntityManager, project: Project, id: string): Promise<{ body: Buffer; contentType: string; filename: string }> {
    const capture = await this.load(em, project, id);
    const bytes = await this.audioLoader.bytes(capture);
    const raw = storedFormatOf(capture).container === 'raw-f32le';
    const filename = `${capture.testCase.key}_${capture.target.key}_${capture.build.sha.slice(0, 7)}.${raw ? 'f32' : 'wav'}`;
    return { body: bytes, contentType: raw ? RAW_FLOAT32_MEDIA_TYPE : 'audio/wav', filename };
  }

  /**
   * WAV (32-bit float) of the capture, its stimulus, or the residual: what the firmware changed.
   * The stimulus is the stored file; the others are rendered in a compute thread.
   */
  async audio(em: EntityManager, project: Project, id: string, kind: AudioKind): Promise<WavStream> {
    const capture = await this.load(em, project, id);
    const spec = (await this.judgedSettings(em, capture)).stimulus;
    if (kind === 'stimulus') return this.stimuli.open(spec);
    const bytes = await this.audioLoader.bytes(capture);
    const wav = await this.compute
      .run('renderCaptureWav', { bytes, format: storedFormatOf(capture), kind, stimulus: kind === 'residual' ? spec : null }, ownBuffer(bytes))
      .catch((error: unknown) => {
        throw decodeRefusalOf(error, (m) => `Capture ${capture.id} cannot be analysed: ${m}`) ?? error;
      });
    return { body: Readable.from([Buffer.from(wav.buffer, wav.byteOffset, wav.byteLength)]), size: wav.byteLength };
  }
}
