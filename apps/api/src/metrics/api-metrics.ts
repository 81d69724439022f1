import { Counter, Histogram, type Registry } from '@earmark/platform';

/** What the capture-upload route reports; see UploadOutcome. */
export interface UploadMetrics {
  /** A new capture was stored and its analysis queued (202); `bytes` is the uploaded file's size. */
  accepted(bytes: number): void;
  /** The same upload again (Idempotency-Key): answered with the first capture, nothing stored. */
  replayed(): void;
  /** The upload was read but not taken: too large, malformed, wrong test case, busy, storage down. */
  refused(): void;
}

/** The API's own series; the registry also holds the process defaults and the shared gauges. */
export interface ApiMetrics {
  httpRequests: Counter<'method' | 'route' | 'status'>;
  httpDuration: Histogram<'method' | 'route'>;
  uploads: UploadMetrics;
}

// Seconds: fast reads through to long-polled verdict waits (up to 30 s) and large uploads.
const HTTP_BUCKETS = [0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1, 2.5, 5, 10, 30, 60];

export function createApiMetrics(registry: Registry): ApiMetrics {
  const httpRequests = new Counter({
    name: 'earmark_http_requests_total',
    help: 'HTTP requests answered by this API process, by method, route template (unmatched: no route; web: the dashboard files) and status.',
    labelNames: ['method', 'route', 'status'],
    registers: [registry],
  });
  const httpDuration = new Histogram({
    name: 'earmark_http_request_duration_seconds',
    help: 'Time from a request arriving to its answer finishing, by method and route template.',
    labelNames: ['method', 'route'],
    buckets: HTTP_BUCKETS,
    registers: [registry],
  });
  const uploadBytes = new Counter({
    name: 'earmark_capture_upload_bytes_total',
    help: 'Bytes of capture files accepted by this API process (new captures only).',
    registers: [registry],
  });
  const uploadCount = new Counter({
    name: 'earmark_capture_uploads_total',
    help: 'Capture uploads handled by this API process, by outcome (accepted: stored and queued; replayed: an Idempotency-Key repeat; refused: read but not taken). Requests stopped before the upload is read (authentication, permission) show only in earmark_http_requests_total.',
    labelNames: ['outcome'],
    registers: [registry],
  });
  // Zero from the start, so a rate() over a fresh process is not missing the series.
  for (const outcome of ['accepted', 'replayed', 'refused']) uploadCount.inc({ outcome }, 0);
  return {
    httpRequests,
    httpDuration,
    uploads: {
      accepted(bytes) {
        uploadCount.inc({ outcome: 'accepted' });
        uploadBytes.inc(bytes);
      },
      replayed: () => uploadCount.inc({ outcome: 'replayed' }),
      refused: () => uploadCount.inc({ outcome: 'refused' }),
    },
  };
}
