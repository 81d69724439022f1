import { randomUUID } from 'node:crypto';
import { UniqueConstraintViolationException, type EntityManager } from '@mikro-orm/postgresql';
import { RAW_FLOAT32_MEDIA_TYPE, aggregateBuildStatus, type CaptureDto } from '@earmark/contracts';
import { Capture, Target, TestCase, type Project } from '@earmark/db';
import { ObjectStoreUnavailableError, type ObjectStore } from '@earmark/platform';
import { decodeRefusalOf } from '../compute/compute-errors.js';
import type { UploadInspection, ViewsCompute } from '../compute/views-tasks.js';
import type { JobProducer } from '../jobs/job-producer.js';
import type { Logger } from 'pino';
import { ConflictError, QuotaExceededError, ServiceUnavailableError, UnsupportedCaptureError, ValidationError } from '../errors.js';
import { presentCaptures, toCaptureDto } from './capture-presenter.js';
import { assertCaptureFitsTestCase } from './capture-requirements.js';
import { findOrCreateBuild } from '../repositories/builds.js';
import type { Links } from './links.js';
import { recordAudit } from './audit.service.js';
import { actorName, type Principal } from '../actor.js';
import { storedSettingsFor } from '../judging/judging-settings.js';
import { maskInForce } from '../repositories/masks.js';
import { assertWithinQuota } from '../lifecycle/storage-quota.js';
import { assertAcceptsUploads } from '../rules/project-archive.js';

/** A capture upload as the HTTP edge parsed it: bytes, how to read them, and where they go. */
export interface CaptureUpload {
  bytes: Buffer;
  /** `wav`, or raw little-endian float32 frames with the rate and channel count given beside them. */
  encoding: { kind: 'wav' } | { kind: 'raw-float32'; sampleRate: number; channels: number };
  testCase: string;
  target?: string;
  fileName: string | null;
  idempotencyKey: string | null;
}

export interface IngestDeps {
  objectStore: ObjectStore;
  jobs: JobProducer;
  links: Links;
  logger: Logger;
  /** Where the full decode runs: a compute pool in the API. */
  compute: ViewsCompute;
  /** The storage quota of projects without their own (EARMARK_PROJECT_QUOTA_BYTES; 0 or unset: unlimited). */
  storageQuotaDefaultBytes?: number;
}

/** The test case and target an upload goes to. */
export interface ResolvedDestination {
  testCase: TestCase;
  target: Target;
}

export interface IngestResult {
  created: boolean;
  capture: CaptureDto;
}

/**
 * The upload path of a capture: fully validate the parsed upload, store the bytes,
 * then insert the row and queue the analysis. A body that fails validation leaves no
 * row and no object; an object whose row could not be written is deleted again.
 */
export class CaptureIngestService {
  constructor(private readonly deps: IngestDeps) {}

  /** @param resolved the test case and target `resolveCaseAndTarget` already found for this upload (raw bodies), saving their look-up */
  async ingest(em: EntityManager, project: Project, sha: string, upload: CaptureUpload, principal: Principal, resolved?: ResolvedDestination): Promise<IngestResult> {
    assertAcceptsUploads(project);
    const { testCase, target } =
      resolved && resolved.testCase.key === upload.testCase && (!upload.target || resolved.target.key === upload.target) ? resolved : await this.resolveCaseAndTarget(em, project, upload);
    const { idempotencyKey } = upload;
    if (idempotencyKey) {
      const existing = await this.findByIdempotencyKey(em, project, idempotencyKey);
      if (existing) return this.replay(em, existing, testCase, target);
    }

    // Before decoding or storing anything: a capture past the quota costs one indexed sum (checked again at the insert).
    await assertWithinQuota(em, project, upload.bytes.length, this.deps.storageQuotaDefaultBytes);
    const audio = await this.inspect(upload);
    if (target.sampleRate !== null && audio.sampleRate !== target.sampleRate) {
      throw new UnsupportedCaptureError(
        `The capture is sampled at ${audio.sampleRate} Hz but target ${target.key} runs at ${target.sampleRate} Hz.`,
        'sample-rate-mismatch',
      );
    }
    const settings = storedSettingsFor(testCase, await maskInForce(em, testCase, target));
    assertCaptureFitsTestCase({ sampleRate: audio.sampleRate, channelCount: audio.channelCount }, testCase, settings);
    const { sha256 } = audio;
    const captureId = randomUUID();
    const extension = audio.format.container === 'wav' ? 'wav' : 'f32';
    const objectKey = `captures/${project.key}/${sha}/${captureId}.${extension}`;
    try {
      await this.deps.objectStore.put(objectKey, upload.bytes, audio.format.container === 'wav' ? 'audio/wav' : RAW_FLOAT32_MEDIA_TYPE, { sha256 }, { payloadSha256: sha256 });
    } catch (error) {
      if (error instanceof ObjectStoreUnavailableError) {
        this.deps.logger.warn({ err: error }, 'object store unavailable during upload');
        throw new ServiceUnavailableError('Capture storage is unavailable right now; nothing was stored. Retry the upload shortly.', 5);
      }
      throw error;
    }

    let capture: Capture;
    try {
      capture = await em.transactional(async (tx) => {
        // Again under the project's lock: uploads that passed the early check together are counted one by one.
        await assertWithinQuota(tx, project, upload.bytes.length, this.deps.storageQuotaDefaultBytes, { locked: true });
        const { build } = await findOrCreateBuild(tx, project, sha);
        const row = tx.create(Capture, {
          id: captureId,
          project,
          build,
          testCase,
          target,
          objectKey,
          sha256,
          sizeBytes: upload.bytes.length,
          format: { ...audio.format, fileName: upload.fileName },
          sampleRate: audio.sampleRate,
          channelCount: audio.channelCount,
          frames: audio.frames,
          idempotencyKey,
        });
        // A new capture without a verdict puts the build back to pending.
        build.status = aggregateBuildStatus([{ status: 'queued', outcome: null }]);
        recordAudit(tx, { actor: actorName(principal), action: 'capture.upload', subject: `capture:${captureId}`, project, details: { sha, testCase: testCase.key, target: target.key, sha256 } });
        await tx.flush();
        return row;
      });
    } catch (error) {
      await this.deps.objectStore.delete(objectKey).catch((e: unknown) => this.deps.logger.error({ err: e, objectKey }, 'could not delete an orphaned capture object'));
      // Two requests with one key raced and the other one won: answer with its capture. Under a
      // quota the loser may be refused by the locked check (the winner's bytes now count) before
      // it reaches the unique index; it is still a replay, not a refusal.
      if ((error instanceof UniqueConstraintViolationException || error instanceof QuotaExceededError) && idempotencyKey) {
        em.clear();
        const existing = await this.findByIdempotencyKey(em, project, idempotencyKey);
        if (existing) return this.replay(em, existing, testCase, target);
      }
      throw error;
    }

    await this.enqueue(capture.id);
    // Just written: no verdict to look up (the answer describes the capture as accepted).
    return { created: true, capture: toCaptureDto(capture, null, this.deps.links) };
  }

  /** Queues the analysis; if the queue is unreachable the worker's sweep picks the capture up later. */
  private async enqueue(captureId: string): Promise<void> {
    try {
      const id = await this.deps.jobs.analyzeCapture({ captureId });
      if (!id) this.deps.logger.error({ captureId }, 'analysis job was not queued (queue missing?)');
    } catch (error) {
      this.deps.logger.warn({ err: error, captureId }, 'analysis job not queued now; the worker sweep will queue it');
    }
  }

  /** The test case and target an upload names; the edge calls it before reading a raw body. */
  async resolveCaseAndTarget(em: EntityManager, project: Project, params: { testCase: string; target?: string }): Promise<ResolvedDestination> {
    const testCase = await em.findOne(TestCase, { project, key: params.testCase });
    if (!testCase) {
      throw new ValidationError(`Project ${project.key} has no test case ${params.testCase}.`, [{ path: 'testCase', message: 'unknown test case' }]);
    }
    let target: Target | null;
    if (params.target) {
      target = await em.findOne(Target, { project, key: params.target });
      if (!target) throw new ValidationError(`Project ${project.key} has no target ${params.target}.`, [{ path: 'target', message: 'unknown target' }]);
    } else {
      const targets = await em.find(Target, { project }, { limit: 2 });
      if (targets.length !== 1) {
        throw new ValidationError(`Name the target: project ${project.key} has ${targets.length === 0 ? 'no targets' : 'several targets'}.`, [{ path: 'target', message: 'required' }]);
      }
      target = targets[0]!;
    }
    return { testCase, target };
  }

  private findByIdempotencyKey(em: EntityManager, project: Project, key: string) {
    return em.findOne(Capture, { project, idempotencyKey: key }, { populate: ['project', 'build', 'testCase', 'target'] });
  }

  private async replay(em: EntityManager, existing: Capture, testCase: TestCase, target: Target): Promise<IngestResult> {
    if (existing.testCase.id !== testCase.id || existing.target.id !== target.id) {
      throw new ConflictError('This Idempotency-Key was already used for a capture of another test case or target.');
    }
    const [dto] = await presentCaptures(em, [existing], this.deps.links);
    return { created: false, capture: dto! };
  }

  /**
   * Decodes every sample in a compute thread. The thread gets a copy (the bytes are stored
   * afterwards), moved rather than serialised: one memcpy instead of the slower structured clone.
   */
  private async inspect(upload: CaptureUpload): Promise<UploadInspection> {
    if (upload.bytes.length === 0) throw new UnsupportedCaptureError('The capture is empty (0 bytes).', 'empty');
    const bytes = new Uint8Array(upload.bytes.byteLength);
    bytes.set(upload.bytes);
    return this.deps.compute.run('inspectUpload', { bytes, encoding: upload.encoding }, [bytes.buffer]).catch((error: unknown) => {
      throw decodeRefusalOf(error) ?? error;
    });
  }
}
