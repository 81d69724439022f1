import { describeCheckValues, formatMarginAt, type BuildDetail, type CaptureDto, type CheckResultDto } from '@earmark/contracts';
import { describeFailedCheck } from '@earmark/cli';
import { describeFailure, describeReportedCheck, failReason, renderJunit } from '@earmark/domain';
import { describe, expect, it } from 'vitest';
import { describeMargin } from '../../apps/web/src/lib/format-measure.js';
import { formatMargin as webCheckMargin } from '../../apps/web/src/features/captures/utils/check-format.js';

/**
 * Issue 14, item 5: one rendering per quantity across the web, API text (finding titles,
 * JUnit XML), mail and the CLI. Each surface's own code path renders the same failing checks;
 * every one must contain the same margin-at-location string and the same values phrase.
 */

const M = '\u2212';

type Failing = Pick<CheckResultDto, 'id' | 'kind' | 'label' | 'measured' | 'limit' | 'margin' | 'unit' | 'worstHz'>;

const response: Failing = { id: 'response', kind: 'magnitude-envelope', label: null, measured: 2.831909, limit: 2, margin: -0.831909, unit: 'dB', worstHz: 7986.3 };
const clipping: Failing = { id: 'clipping', kind: 'integrity', label: null, measured: 79153, limit: 0, margin: -79153, unit: 'count', worstHz: null };
const level: Failing = { id: 'level', kind: 'level', label: null, measured: -33.104, limit: -16, margin: -17.104, unit: 'dBFS', worstHz: null };

const resultOf = (c: Failing): CheckResultDto => ({ ...c, pass: false, waiver: null });

function junitFor(checks: Failing[]): string {
  const capture: CaptureDto = {
    id: 'cap-1', projectKey: 'kestrel-buds', buildSha: 'a1b2c3d4e5', testCase: 'eq.music.sweep', target: 'evt2-48k', status: 'done',
    sha256: '0'.repeat(64), sizeBytes: 1, sampleRate: 48000, channels: 1, frames: 1, createdAt: '2026-12-01T09:59:00.000Z', purgedAt: null,
    verdict: { outcome: 'fail', reason: null, engineVersion: '9.9.9', maskRevisionId: 'rev-1', maskRevision: 1, createdAt: '2026-12-01T10:00:00.000Z', checks: checks.map(resultOf) },
    links: { self: '', build: '', dashboard: '' },
  };
  const build: BuildDetail = {
    id: 'b-1', projectKey: 'kestrel-buds', sha: 'a1b2c3d4e5', label: null, branch: 'main', pipelineUrl: null, status: 'fail',
    createdAt: '2026-12-01T09:58:00.000Z', captureCount: 1, counts: { pass: 0, fail: 1, error: 0, pending: 0 }, captures: [capture],
    links: { self: '', junit: '', dashboard: '' },
  };
  return renderJunit(build);
}

/** What each surface shows for one failing check. */
function surfaces(c: Failing): Record<string, string> {
  return {
    'web findings/matrix': describeMargin(c),
    'finding title': describeFailure({ ...c, pass: false, details: {} }),
    'verdict reason': failReason([{ ...c, pass: false, details: {} }]),
    junit: junitFor([c]),
    mail: describeReportedCheck({ ...c, error: null, waivedUntil: null }),
    cli: describeFailedCheck(resultOf(c)),
  };
}

describe('one rendering per quantity across the web, API text, JUnit and mail', () => {
  it.each([
    ['a response failure', response, `${M}0.83 dB at 7.99 kHz`, `measured 2.83 dB, limit 2.00 dB, margin ${M}0.83 dB at 7.99 kHz`],
    ['a count failure (title and margin round alike)', clipping, `${M}79153`, `measured 79153, limit 0, margin ${M}79153`],
    ['a level failure (its margin in dB, not dBFS)', level, `${M}17.10 dB`, `measured ${M}33.10 dBFS, limit ${M}16.00 dBFS, margin ${M}17.10 dB`],
  ])('%s', (_name, check, margin, values) => {
    expect(formatMarginAt(check.margin, check.unit, check.worstHz)).toBe(margin);
    expect(describeCheckValues(check)).toBe(values);
    const shown = surfaces(check);
    // The margin with its location reads the same on every surface…
    for (const [surface, text] of Object.entries(shown)) expect({ surface, contains: text.includes(margin) }).toEqual({ surface, contains: true });
    // …and so does the whole phrase wherever a surface shows measured value and limit too.
    for (const surface of ['finding title', 'junit', 'mail', 'cli']) expect({ surface, contains: shown[surface]!.includes(values) }).toEqual({ surface, contains: true });
    // The capture page's checks table shows the margin in its own column, the worst frequency in another.
    expect(webCheckMargin(check.margin, check.unit)).toBe(margin.replace(/ at .*$/, ''));
  });

  it('no surface falls back to an ASCII minus, a dBFS margin or a rounded-off count', () => {
    const all = [response, clipping, level].flatMap((c) => [...Object.values(surfaces(c)), webCheckMargin(c.margin, c.unit)]);
    for (const text of all) {
      expect(text).not.toMatch(/margin -\d|-0\.8|79150|79153\.0|margin \S+ dBFS/);
    }
  });
});
