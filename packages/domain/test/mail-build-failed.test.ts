import { describe, expect, it } from 'vitest';
import { composeBuildFailedMail, createLinks, describeReportedCheck, type BuildFailedInput, type ReportedCheck } from '../src/index.js';

const links = createLinks('https://earmark.example/');
const check = (c: Partial<ReportedCheck> & { id: string }): ReportedCheck => ({
  label: null, measured: null, limit: null, margin: null, unit: null, worstHz: null, error: null, waivedUntil: null, ...c,
});

const input: BuildFailedInput = {
  project: { key: 'kestrel-buds', name: 'Kestrel Buds' },
  build: { sha: '4f2a9c1d0e5b7a8c', branch: 'main', label: 'rc2' },
  status: 'error',
  links,
  cells: [
    {
      testCase: 'eq.music.sweep', target: 'evt2-48k', captureId: 'cap-sweep', outcome: 'fail', reason: null,
      checks: [
        check({ id: 'response', label: 'Flat ±1 dB', measured: 2.0412, limit: 1, margin: -1.0412, unit: 'dB', worstHz: 8021.7 }),
        check({ id: 'thd', measured: 0.52, limit: 0.1, margin: -0.42, unit: '%', waivedUntil: '2027-03-31T23:59:59.999Z' }),
      ],
    },
    { testCase: 'eq.music.sweep', target: 'evt1-44k', captureId: 'cap-sweep-2', outcome: 'fail', reason: null, checks: [check({ id: 'level', measured: -33.1, limit: -16, margin: -17.1, unit: 'dBFS' })] },
    { testCase: 'noise.idle', target: 'evt2-48k', captureId: 'cap-idle', outcome: 'error', reason: 'The capture ends 1.400 s before the stimulus ends.', checks: [] },
    { testCase: 'tone.level', target: 'board', captureId: 'cap-tone', outcome: 'pass', reason: 'passed with waiver: loudness', checks: [check({ id: 'loudness', margin: -0.5, unit: 'LUFS', waivedUntil: '2027-01-15T23:59:59.999Z' })] },
    { testCase: 'hum.idle', target: 'board', captureId: 'cap-hum', outcome: 'pass', reason: null, checks: [] },
  ],
};

describe('build-failed mail', () => {
  const mail = composeBuildFailedMail(input);

  it('names the build and counts failing and erroring cells in the subject (an error outranks a failure)', () => {
    expect(mail.kind).toBe('build-failed');
    expect(mail.subject).toBe('[Earmark] kestrel-buds build 4f2a9c1d0e has errors: 2 failing cells, 1 erroring cell');
    expect(composeBuildFailedMail({ ...input, status: 'fail', cells: input.cells.slice(0, 1) }).subject).toBe('[Earmark] kestrel-buds build 4f2a9c1d0e failed: 1 failing cell');
    expect(mail.text.split('\n')[0]).toBe('Build 4f2a9c1d0e5b7a8c on main (rc2) of Kestrel Buds has errors: some captures could not be judged, so the gate cannot tell whether it meets its masks.');
  });

  it('lists every failing and erroring cell with its checks, margins with units (dB for a dBFS check), worst frequency and its capture link', () => {
    const failed = mail.text.slice(mail.text.indexOf('Failed:'), mail.text.indexOf('Could not be judged:'));
    expect(failed.split('\n').filter(Boolean)).toEqual([
      'Failed:',
      '- eq.music.sweep on evt2-48k',
      '  Flat ±1 dB (response): measured 2.04 dB, limit 1.00 dB, margin −1.04 dB at 8.02 kHz',
      '  thd: passed with waiver, until 2027-03-31',
      '  Capture: https://earmark.example/projects/kestrel-buds/builds/4f2a9c1d0e5b7a8c/captures/cap-sweep',
      '- eq.music.sweep on evt1-44k',
      '  level: measured −33.10 dBFS, limit −16.00 dBFS, margin −17.10 dB',
      '  Capture: https://earmark.example/projects/kestrel-buds/builds/4f2a9c1d0e5b7a8c/captures/cap-sweep-2',
    ]);
    const errored = mail.text.slice(mail.text.indexOf('Could not be judged:'), mail.text.indexOf('Passed with waiver:'));
    expect(errored.split('\n').filter(Boolean)).toEqual([
      'Could not be judged:',
      '- noise.idle on evt2-48k',
      '  The capture ends 1.400 s before the stimulus ends.',
      '  Capture: https://earmark.example/projects/kestrel-buds/builds/4f2a9c1d0e5b7a8c/captures/cap-idle',
    ]);
  });

  it('shows waived checks as passed with waiver until their date, never among the failures', () => {
    const waived = mail.text.slice(mail.text.indexOf('Passed with waiver:'), mail.text.indexOf('Open the build:'));
    expect(waived.split('\n').filter(Boolean)).toEqual([
      'Passed with waiver:',
      '- tone.level on board',
      '  loudness: passed with waiver, until 2027-01-15',
      '  Capture: https://earmark.example/projects/kestrel-buds/builds/4f2a9c1d0e5b7a8c/captures/cap-tone',
    ]);
    expect(mail.text).not.toMatch(/thd: measured/);
    expect(mail.text).not.toMatch(/loudness: .*margin/);
  });

  it('leaves out passing cells, links the build and says why the reader gets it and where to change that', () => {
    expect(mail.text).not.toContain('hum.idle');
    expect(mail.text).toContain('Open the build: https://earmark.example/projects/kestrel-buds/builds/4f2a9c1d0e5b7a8c\n');
    expect(mail.text).toContain('\n-- \nYou get this because you subscribed to build-failure mail of Kestrel Buds (on by default for engineers and QA managers). Change it on the project page: https://earmark.example/projects/kestrel-buds#mail\n');
    expect(mail.payload).toEqual({ project: 'kestrel-buds', sha: '4f2a9c1d0e5b7a8c', status: 'error', captureIds: ['cap-sweep', 'cap-sweep-2', 'cap-idle'] });
  });

  it('has an HTML part with the same cells and links', () => {
    expect(mail.html).toMatch(/^<!doctype html>/);
    expect(mail.html).toContain('<h3 style="font-size:15px;margin:1.2em 0 0.4em">Failed</h3>');
    expect(mail.html).toContain('Flat ±1 dB (response): measured 2.04 dB, limit 1.00 dB, margin −1.04 dB at 8.02 kHz');
    expect(mail.html).toContain('<a href="https://earmark.example/projects/kestrel-buds/builds/4f2a9c1d0e5b7a8c/captures/cap-idle">');
    expect(mail.html).toContain('<a href="https://earmark.example/projects/kestrel-buds#mail">Change it on the project page</a>');
    expect(mail.html).not.toContain('hum.idle');
  });

  it('escapes every interpolated value in the HTML part, and only there', () => {
    const hostile = composeBuildFailedMail({
      ...input,
      project: { key: 'kestrel-buds', name: 'Kestrel <Buds> & "Co"' },
      build: { sha: 'abc1234', branch: "feat/<script>alert('x')</script>", label: null },
      cells: [{ testCase: 'eq.<b>', target: 't&1', captureId: 'c"1', outcome: 'error', reason: '<img src=x onerror=alert(1)>', checks: [check({ id: 'level', label: '<i>loud</i>', margin: -1, unit: 'dB' })] }],
    });
    expect(hostile.html).not.toMatch(/<script|<img|<b>|<i>/);
    expect(hostile.html).toContain('Kestrel &lt;Buds&gt; &amp; &quot;Co&quot;');
    expect(hostile.html).toContain('feat/&lt;script&gt;alert(&#39;x&#39;)&lt;/script&gt;');
    expect(hostile.html).toContain('eq.&lt;b&gt; on t&amp;1');
    expect(hostile.html).toContain('&lt;img src=x onerror=alert(1)&gt;');
    expect(hostile.html).toContain('&lt;i&gt;loud&lt;/i&gt; (level): margin −1.00 dB');
    expect(hostile.html).toContain('href="https://earmark.example/projects/kestrel-buds/builds/abc1234/captures/c&quot;1"');
    // The plain-text part is text: nothing to escape.
    expect(hostile.text).toContain("Build abc1234 on feat/<script>alert('x')</script> of Kestrel <Buds> & \"Co\" has errors");
  });
});

describe('describeReportedCheck', () => {
  it('formats each part it has and says when nothing was measured', () => {
    expect(describeReportedCheck(check({ id: 'clipping', measured: 312, limit: 0, margin: -312 }))).toBe('clipping: measured 312, limit 0, margin −312');
    expect(describeReportedCheck(check({ id: 'band', margin: -0.25, unit: 'dB', worstHz: 63.0957 }))).toBe('band: margin −0.25 dB at 63.1 Hz');
    expect(describeReportedCheck(check({ id: 'response', error: 'the capture is too short' }))).toBe('response: could not be measured: the capture is too short');
    expect(describeReportedCheck(check({ id: 'odd' }))).toBe('odd: failed');
  });
});
