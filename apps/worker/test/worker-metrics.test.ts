import { createMetricsRegistry } from '@earmark/platform';
import { describe, expect, it } from 'vitest';
import type { Mailer, OutgoingMail } from '../src/mailer.js';
import { createWorkerMetrics } from '../src/worker-metrics.js';

const mail: OutgoingMail = { to: 'qa@example.test', subject: 's', text: 't', html: null };

function setUp() {
  const registry = createMetricsRegistry('worker', 'w1');
  const metrics = createWorkerMetrics(registry, ['analyze-capture', 'send-notifications']);
  const series = async (name: string) =>
    Object.fromEntries((await registry.getSingleMetric(name)!.get()).values.map((v) => [Object.values(v.labels).join('/'), v.value]));
  return { metrics, series, registry };
}

describe('worker metrics', () => {
  it('start every verdict, job and mail series at zero', async () => {
    const { series } = setUp();
    expect(await series('earmark_verdicts_total')).toEqual({ pass: 0, fail: 0, error: 0 });
    expect(await series('earmark_jobs_total')).toEqual({
      'analyze-capture/completed': 0,
      'analyze-capture/failed': 0,
      'send-notifications/completed': 0,
      'send-notifications/failed': 0,
    });
    expect(await series('earmark_mails_sent_total')).toEqual({ sent: 0, refused: 0, unreachable: 0 });
  });

  it('count a job that returns as completed and one that throws as failed, passing its value and error through', async () => {
    const { metrics, series } = setUp();
    const double = metrics.countJobs('analyze-capture', async (n: number) => n * 2);
    await expect(double(21)).resolves.toBe(42);
    const boom = metrics.countJobs('analyze-capture', () => Promise.reject(new Error('object store unavailable')));
    await expect(boom()).rejects.toThrow('object store unavailable');
    expect(await series('earmark_jobs_total')).toMatchObject({ 'analyze-capture/completed': 1, 'analyze-capture/failed': 1, 'send-notifications/completed': 0 });
  });

  it('count mail by result: sent, refused by the relay, relay unreachable', async () => {
    const { metrics, series } = setUp();
    const failures: unknown[] = [null, Object.assign(new Error('mailbox unavailable'), { responseCode: 550 }), Object.assign(new Error('connect ECONNREFUSED'), { code: 'ECONNREFUSED' })];
    const relay: Mailer = {
      send: async () => {
        const failure = failures.shift();
        if (failure) throw failure;
      },
      close: () => {},
    };
    const counted = metrics.countMail(relay);
    await counted.send(mail);
    await expect(counted.send(mail)).rejects.toThrow('mailbox unavailable');
    await expect(counted.send(mail)).rejects.toThrow('ECONNREFUSED');
    expect(await series('earmark_mails_sent_total')).toEqual({ sent: 1, refused: 1, unreachable: 1 });
  });

  it('time analyses by outcome in seconds, in buckets up to two minutes', async () => {
    const { metrics, registry } = setUp();
    metrics.judging.analysisTimed('fail', 0.8);
    metrics.judging.analysisTimed('fail', 45);
    metrics.judging.analysisTimed('pass', 0.03);
    const values = (await registry.getSingleMetric('earmark_analysis_duration_seconds')!.get()).values as { value: number; labels: Record<string, string | number>; metricName?: string }[];
    const of = (metricName: string, labels: Record<string, string | number>) =>
      values.find((v) => v.metricName === metricName && Object.entries(labels).every(([k, l]) => v.labels[k] === l))?.value;
    expect(of('earmark_analysis_duration_seconds_count', { outcome: 'fail' })).toBe(2);
    expect(of('earmark_analysis_duration_seconds_sum', { outcome: 'fail' })).toBeCloseTo(45.8, 9);
    expect(of('earmark_analysis_duration_seconds_bucket', { outcome: 'fail', le: 1 })).toBe(1);
    expect(of('earmark_analysis_duration_seconds_bucket', { outcome: 'fail', le: 30 })).toBe(1);
    expect(of('earmark_analysis_duration_seconds_bucket', { outcome: 'fail', le: 60 })).toBe(2);
    expect(of('earmark_analysis_duration_seconds_bucket', { outcome: 'pass', le: 0.05 })).toBe(1);
    expect(values.filter((v) => v.metricName === 'earmark_analysis_duration_seconds_bucket' && v.labels.outcome === 'pass').map((v) => v.labels.le)).toEqual([0.05, 0.1, 0.25, 0.5, 1, 2, 5, 10, 20, 30, 60, 120, '+Inf']);
  });
});
