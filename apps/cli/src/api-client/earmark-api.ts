import { BuildDetail, BuildRow, CaptureDto, type UpsertBuildRequest } from '@earmark/contracts';
import type { ApiClient } from './api-client.js';

export interface CaptureUpload {
  project: string;
  sha: string;
  testCase: string;
  /** Omitted: the server uses the project's only target, or answers 422. */
  target?: string;
  contentType: string;
  /** X-Sample-Rate / X-Channels for raw float32. */
  formatHeaders: Record<string, string>;
  idempotencyKey: string;
  sizeBytes: number;
  body: () => ReadableStream<Uint8Array>;
}

// NOTE: an upload of a large capture over a slow link may take minutes; JSON calls do not.
const UPLOAD_TIMEOUT_MS = 10 * 60_000;

const seg = encodeURIComponent;

/** The CI routes of the Earmark REST API (docs/ci.md), each answer validated against contracts. */
export class EarmarkApi {
  constructor(private readonly client: ApiClient) {}

  /** Creates the build (201) or updates its label/branch/pipeline URL (200). */
  async upsertBuild(project: string, request: UpsertBuildRequest): Promise<{ created: boolean; build: BuildRow }> {
    const { status, data } = await this.client.json(BuildRow, { method: 'POST', path: `/api/v1/projects/${seg(project)}/builds`, json: request });
    return { created: status === 201, build: data };
  }

  /** Uploads one capture; `reused` is true when the server had already seen the Idempotency-Key (200, not 202). */
  async uploadCapture(upload: CaptureUpload): Promise<{ reused: boolean; capture: CaptureDto }> {
    const { status, data } = await this.client.json(CaptureDto, {
      method: 'POST',
      path: `/api/v1/projects/${seg(upload.project)}/builds/${seg(upload.sha)}/captures`,
      query: { testCase: upload.testCase, target: upload.target },
      headers: {
        'content-type': upload.contentType,
        // Sent so the server can refuse an oversized capture before reading it.
        'content-length': String(upload.sizeBytes),
        'idempotency-key': upload.idempotencyKey,
        ...upload.formatHeaders,
      },
      body: upload.body,
      timeoutMs: UPLOAD_TIMEOUT_MS,
    });
    return { reused: status === 200, capture: data };
  }

  /**
   * The capture as it stands. With `waitS` the server holds the answer until the verdict is there
   * or that many seconds (at most 30) pass, so one request replaces many polls.
   */
  async getCapture(id: string, options: { deadline?: number; waitS?: number } = {}): Promise<CaptureDto> {
    const request = {
      method: 'GET' as const,
      path: `/api/v1/captures/${seg(id)}`,
      ...(options.waitS ? { query: { wait: String(options.waitS) } } : {}),
      ...(options.deadline === undefined ? {} : { deadline: options.deadline }),
    };
    return (await this.client.json(CaptureDto, request)).data;
  }

  /** The build with its verdict counts, captures and links. */
  async getBuild(project: string, sha: string): Promise<BuildDetail> {
    return (await this.client.json(BuildDetail, { method: 'GET', path: `/api/v1/projects/${seg(project)}/builds/${seg(sha)}` })).data;
  }

  /** The build's JUnit XML as the server renders it. */
  getJunit(project: string, sha: string): Promise<string> {
    return this.client.text({ method: 'GET', path: `/api/v1/projects/${seg(project)}/builds/${seg(sha)}/junit.xml`, accept: 'application/xml' });
  }

  /** The build page in the web app (the same address as BuildDetail's links.dashboard). */
  dashboardUrl(project: string, sha: string): string {
    return this.client.url(`/projects/${seg(project)}/builds/${seg(sha)}`);
  }
}
