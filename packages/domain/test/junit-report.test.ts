import type { BuildDetail, CaptureDto, CheckResultDto, VerdictDto } from '@earmark/contracts';
import { XMLParser } from 'fast-xml-parser';
import { describe, expect, it } from 'vitest';
import { renderJunit } from '../src/services/junit-report.js';

/** renderJunit: what a CI system's test-report feature reads, parsed back as such a tool would. */

const check = (over: Partial<CheckResultDto> & { id: string }): CheckResultDto => ({
  kind: 'level',
  label: null,
  pass: true,
  measured: -12,
  limit: -10,
  margin: 2,
  unit: 'dBFS',
  worstHz: null,
  waiver: null,
  ...over,
});
const verdict = (outcome: VerdictDto['outcome'], checks: CheckResultDto[], reason: string | null = null): VerdictDto => ({
  outcome,
  reason,
  engineVersion: '9.9.9',
  maskRevisionId: 'rev-1',
  maskRevision: 1,
  createdAt: '2026-12-01T10:00:00.000Z',
  checks,
});
let n = 0;
const capture = (testCase: string, status: CaptureDto['status'], v: VerdictDto | null, target = 'evt2-48k'): CaptureDto => ({
  id: `cap-${++n}`,
  projectKey: 'kestrel-buds',
  buildSha: 'a1b2c3d4e5',
  testCase,
  target,
  status,
  sha256: '0'.repeat(64),
  sizeBytes: 1,
  sampleRate: 48000,
  channels: 1,
  frames: 1,
  createdAt: '2026-12-01T09:59:00.000Z',
  purgedAt: null,
  verdict: v,
  links: { self: '', build: '', dashboard: '' },
});
const build = (captures: CaptureDto[]): BuildDetail => ({
  id: 'b-1',
  projectKey: 'kestrel-buds',
  sha: 'a1b2c3d4e5',
  label: null,
  branch: 'main',
  pipelineUrl: null,
  status: 'pass',
  createdAt: '2026-12-01T09:58:00.000Z',
  captureCount: captures.length,
  counts: { pass: 0, fail: 0, error: 0, pending: 0 },
  captures,
  links: { self: '', junit: '', dashboard: '' },
});

interface Property {
  '@_name': string;
  '@_value': string;
}
interface Case {
  '@_classname': string;
  '@_name': string;
  failure?: unknown;
  error?: { '@_message'?: string; '@_type'?: string };
  skipped?: unknown;
  properties?: { property: Property | Property[] };
}
interface Suite {
  '@_name': string;
  '@_tests': string;
  '@_failures': string;
  '@_errors': string;
  '@_skipped': string;
  testcase: Case | Case[];
}

function parse(xml: string): { root: Record<string, string>; suites: Suite[] } {
  const parsed = new XMLParser({ ignoreAttributes: false }).parse(xml) as { testsuites: Record<string, string> & { testsuite: Suite | Suite[] } };
  return { root: parsed.testsuites, suites: [parsed.testsuites.testsuite].flat() };
}
const casesOf = (suite: Suite): Case[] => [suite.testcase].flat();
const propertiesOf = (c: Case): Record<string, string> => Object.fromEntries([c.properties?.property ?? []].flat().map((p) => [p['@_name'], p['@_value']]));

describe('renderJunit', () => {
  it('an error verdict is an <error>, a failing check a <failure>, and the counts follow', () => {
    const xml = renderJunit(
      build([
        capture('eq.music.sweep', 'done', verdict('fail', [check({ id: 'response', pass: false, margin: -1.2, measured: 2.7, limit: 1.5, unit: 'dB', worstHz: 8020, kind: 'magnitude-envelope' }), check({ id: 'level' })])),
        capture('voice.uplink.sweep', 'error', verdict('error', [], 'No approved mask is in force for test case voice.uplink.sweep on target evt2-48k.')),
      ]),
    );
    const { root, suites } = parse(xml);
    expect(suites).toHaveLength(1);
    const [suite] = suites;
    expect([suite!['@_tests'], suite!['@_failures'], suite!['@_errors']]).toEqual(['3', '1', '1']);
    expect([root['@_tests'], root['@_failures'], root['@_errors']]).toEqual(['3', '1', '1']);
    const cases = casesOf(suite!);
    const response = cases.find((c) => c['@_name'] === 'response')!;
    expect(response['@_classname']).toBe('kestrel-buds.eq.music.sweep');
    expect(JSON.stringify(response.failure)).toContain('magnitude-envelope: measured 2.70 dB, limit 1.50 dB, margin \u22121.20 dB at 8.02 kHz');
    expect(response.error).toBeUndefined();
    const errored = cases.find((c) => c['@_classname'] === 'kestrel-buds.voice.uplink.sweep')!;
    expect(errored['@_name']).toBe('verdict');
    expect(errored.error?.['@_message']).toBe('No approved mask is in force for test case voice.uplink.sweep on target evt2-48k.');
    expect(errored.failure).toBeUndefined();
  });

  it('a failing check covered by an approved waiver passes with an earmark.waiver property, not a <failure>', () => {
    const waived = check({ id: 'loudness', pass: false, margin: -0.4, waived: true, waiver: { id: 'w-7', until: '2027-01-15T00:00:00.000Z' } });
    const xml = renderJunit(build([capture('level.tone.997', 'done', { ...verdict('pass', [waived, check({ id: 'thd' })], 'passed with waiver: loudness'), waiver: { id: 'w-7', until: '2027-01-15T00:00:00.000Z' } })]));
    const [suite] = parse(xml).suites;
    expect([suite!['@_tests'], suite!['@_failures'], suite!['@_errors']]).toEqual(['2', '0', '0']);
    const loudness = casesOf(suite!).find((c) => c['@_name'] === 'loudness')!;
    expect(loudness.failure).toBeUndefined();
    expect(propertiesOf(loudness)).toMatchObject({ 'earmark.waiver': 'passed with waiver, until 2027-01-15', 'earmark.waiverId': 'w-7' });
    expect(propertiesOf(casesOf(suite!).find((c) => c['@_name'] === 'thd')!)['earmark.waiver']).toBeUndefined();
  });

  it('a waiver covers only its own check: the other failing check of the capture still fails', () => {
    const waived = check({ id: 'loudness', pass: false, waived: true, waiver: { id: 'w-7', until: '2027-01-15T00:00:00.000Z' } });
    const xml = renderJunit(build([capture('level.tone.997', 'done', verdict('fail', [waived, check({ id: 'dc', pass: false, kind: 'integrity' })]))]));
    const [suite] = parse(xml).suites;
    expect([suite!['@_tests'], suite!['@_failures'], suite!['@_errors']]).toEqual(['2', '1', '0']);
    const cases = casesOf(suite!);
    expect(cases.find((c) => c['@_name'] === 'loudness')!.failure).toBeUndefined();
    expect(cases.find((c) => c['@_name'] === 'dc')!.failure).toBeDefined();
  });

  it('a capture whose analysis broke without a verdict is an <error>; one still waiting is skipped', () => {
    const xml = renderJunit(build([capture('noise.idle', 'error', null), capture('eq.music.sweep', 'queued', null)]));
    const [suite] = parse(xml).suites;
    expect([suite!['@_tests'], suite!['@_failures'], suite!['@_errors'], suite!['@_skipped']]).toEqual(['2', '0', '1', '1']);
    const cases = casesOf(suite!);
    expect(cases.find((c) => c['@_classname'] === 'kestrel-buds.noise.idle')!.error?.['@_message']).toBe('The capture could not be analysed.');
    expect(cases.find((c) => c['@_classname'] === 'kestrel-buds.eq.music.sweep')!.skipped).toBeDefined();
  });
});

describe('renderJunit never says less than the verdict', () => {
  it('a fail verdict that no unwaived failing check explains still counts one <failure>', () => {
    const xml = renderJunit(build([capture('eq.music.sweep', 'done', verdict('fail', [], 'Out of tolerance.')), capture('noise.idle', 'done', verdict('fail', [check({ id: 'dc' })], 'Out of tolerance.'))]));
    const [suite] = parse(xml).suites;
    expect([suite!['@_tests'], suite!['@_failures'], suite!['@_errors']]).toEqual(['3', '2', '0']);
    expect(casesOf(suite!).filter((c) => c['@_name'] === 'verdict' && c.failure)).toHaveLength(2);
  });
});
