import { createHash, randomUUID } from 'node:crypto';
import { UniqueConstraintViolationException, type EntityManager } from '@mikro-orm/postgresql';
import { QUEUES, RAW_FLOAT32_MEDIA_TYPE, TargetKey, TestCaseKey, WAV_MEDIA_TYPES, type CaptureDto } from '@earmark/contracts';
import { Build, Capture, ObjectStoreUnavailableError, Target, TestCase, aggregateBuildStatus, type ObjectStore, type Project } from '@earmark/db';
import { AudioDecodeError, decodeRawFloat32, decodeWav, type DecodedAudio } from '@earmark/dsp';
import type { Request } from 'express';
import type PgBoss from 'pg-boss';
import type { Logger } from 'pino';
import { z } from 'zod';
import { ConflictError, ServiceUnavailableError, UnsupportedCaptureError, UnsupportedMediaTypeError, ValidationError } from '../errors.js';
import { readMultipart, readRawBody, type Upload } from '../http/read-upload.js';
import { parseWith } from '../http/validate.js';
import { presentCaptures } from './capture-presenter.js';
import type { Links } from './links.js';
import { recordAudit } from './audit.service.js';
import { actorName, type Principal } from '../auth/principal.js';

const CaptureParams = z.object({
  testCase: TestCaseKey,
  target: TargetKey.optional(),
});
const RawHeaders = z.object({
  'x-sample-rate': z.coerce.number().int().min(8000).max(192000),
  'x-channels': z.coerce.number().int().min(1).max(8),
});
const IdempotencyKey = z.string().min(1).max(200).regex(/^[\x21-\x7e]+$/, 'printable ASCII without spaces');

export interface IngestDeps {
  objectStore: ObjectStore;
  boss: PgBoss;
  links: Links;
  logger: Logger;
  maxCaptureBytes: number;
}

export interface IngestResult {
  created: boolean;
  capture: CaptureDto;
}

const mediaTypeOf = (header: string | undefined) => (header ?? '').split(';')[0]!.trim().toLowerCase();

/**
 * The upload path of a capture: read and fully validate the body, store the bytes,
 * then insert the row and queue the analysis. A body that fails validation leaves no
 * row and no object; an object whose row could not be written is deleted again.
 */
export class CaptureIngestService {
  constructor(private readonly deps: IngestDeps) {}

  async ingest(em: EntityManager, project: Project, sha: string, req: Request, principal: Principal): Promise<IngestResult> {
    const mediaType = mediaTypeOf(req.headers['content-type']);
    const isMultipart = mediaType === 'multipart/form-data';
    const isWav = (WAV_MEDIA_TYPES as readonly string[]).includes(mediaType);
    const isRaw = mediaType === RAW_FLOAT32_MEDIA_TYPE;
    if (!isMultipart && !isWav && !isRaw) {
      req.resume();
      throw new UnsupportedMediaTypeError(
        `Send a capture as audio/wav, as ${RAW_FLOAT32_MEDIA_TYPE} (with X-Sample-Rate and X-Channels), or as multipart/form-data with a \`file\` part; got ${mediaType || 'no Content-Type'}.`,
      );
    }
    const idempotencyKey = req.headers['idempotency-key'] === undefined ? null : parseWith(IdempotencyKey, req.headers['idempotency-key'], 'params');

    // Raw uploads name the test case and target in the query, so they are checked before the body is read.
    let upload: Upload;
    let params: z.infer<typeof CaptureParams>;
    if (isMultipart) {
      upload = await readMultipart(req, this.deps.maxCaptureBytes);
      params = parseWith(CaptureParams, upload.fields, 'body');
    } else {
      params = parseWith(CaptureParams, req.query, 'query');
      await this.resolveCaseAndTarget(em, project, params);
      upload = { bytes: await readRawBody(req, this.deps.maxCaptureBytes), fields: {}, mediaType, fileName: null };
    }
    const { testCase, target } = await this.resolveCaseAndTarget(em, project, params);

    if (idempotencyKey) {
      const existing = await this.findByIdempotencyKey(em, project, idempotencyKey);
      if (existing) return this.replay(em, existing, testCase, target);
    }

    const audio = this.decode(upload, isRaw || (isMultipart && upload.mediaType === RAW_FLOAT32_MEDIA_TYPE), req);
    if (target.sampleRate !== null && audio.sampleRate !== target.sampleRate) {
      throw new UnsupportedCaptureError(
        `The capture is sampled at ${audio.sampleRate} Hz but target ${target.key} runs at ${target.sampleRate} Hz.`,
        'sample-rate-mismatch',
      );
    }
    const sha256 = createHash('sha256').update(upload.bytes).digest('hex');
    const captureId = randomUUID();
    const extension = audio.format.container === 'wav' ? 'wav' : 'f32';
    const objectKey = `captures/${project.key}/${sha}/${captureId}.${extension}`;
    try {
      await this.deps.objectStore.put(objectKey, upload.bytes, audio.format.container === 'wav' ? 'audio/wav' : RAW_FLOAT32_MEDIA_TYPE, { sha256 });
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
        let build = await tx.findOne(Build, { project, sha });
        build ??= tx.create(Build, { project, sha });
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
          channelCount: audio.channels.length,
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
      if (error instanceof UniqueConstraintViolationException && idempotencyKey) {
        // Two requests with one key raced: the other one won; answer with its capture.
        em.clear();
        const existing = await this.findByIdempotencyKey(em, project, idempotencyKey);
        if (existing) return this.replay(em, existing, testCase, target);
      }
      throw error;
    }

    await this.enqueue(capture.id);
    const [dto] = await presentCaptures(em, [capture], this.deps.links);
    return { created: true, capture: dto! };
  }

  /** Queues the analysis; if the queue is unreachable the worker's sweep picks the capture up later. */
  private async enqueue(captureId: string): Promise<void> {
    try {
      const id = await this.deps.boss.send(QUEUES.analyzeCapture, { captureId });
      if (!id) this.deps.logger.error({ captureId }, 'analysis job was not queued (queue missing?)');
    } catch (error) {
      this.deps.logger.warn({ err: error, captureId }, 'analysis job not queued now; the worker sweep will queue it');
    }
  }

  private async resolveCaseAndTarget(em: EntityManager, project: Project, params: z.infer<typeof CaptureParams>) {
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

  private decode(upload: Upload, raw: boolean, req: Request): DecodedAudio {
    if (upload.bytes.length === 0) throw new UnsupportedCaptureError('The capture is empty (0 bytes).', 'empty');
    try {
      if (!raw) return decodeWav(new Uint8Array(upload.bytes.buffer, upload.bytes.byteOffset, upload.bytes.byteLength));
      const headers = parseWith(RawHeaders, { ...upload.fields, ...req.headers }, 'params');
      return decodeRawFloat32(new Uint8Array(upload.bytes.buffer, upload.bytes.byteOffset, upload.bytes.byteLength), {
        sampleRate: headers['x-sample-rate'],
        channels: headers['x-channels'],
      });
    } catch (error) {
      if (error instanceof AudioDecodeError) throw new UnsupportedCaptureError(error.message, error.code);
      throw error;
    }
  }
}

