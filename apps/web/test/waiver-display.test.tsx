import type { BuildMatrix as Matrix, CaptureDetail, CheckResultDto } from '@earmark/contracts';
import { render, screen, within } from '@testing-library/react';
import { MemoryRouter } from 'react-router';
import { describe, expect, it } from 'vitest';
import { BuildMatrix } from '@/features/builds/components/build-matrix';
import { VerdictCounts } from '@/features/builds/components/verdict-counts';
import { CaptureHeader } from '@/features/captures/components/capture-header';
import { ChecksTable } from '@/features/captures/components/checks-table';
import { stateOptions } from '@/features/findings/components/triage-controls';
import { formatDate } from '@/lib/format';

/** "Passed with waiver, until <date>" where it matters: matrix cell, builds counts, capture page. */
const until = '2027-03-31T23:59:59.999Z';
const waiver = { id: 'w-1', until };
const SHA = 'a81d44c09e2f7b3c1d5e6f708192a3b4c5d6e7f8';
const summary = {
  id: 'b-1', projectKey: 'kestrel-buds', sha: SHA, label: null, branch: 'main', pipelineUrl: null, status: 'pass' as const,
  createdAt: '2025-06-10T08:00:00.000Z', captureCount: 2, counts: { pass: 2, fail: 0, error: 0, pending: 0, waived: 1 },
};
const waivedCheck: CheckResultDto = { id: 'hf-level', kind: 'band-levels', label: null, pass: false, measured: 1.42, limit: 0.8, margin: -0.62, unit: 'dB', worstHz: 7943.28, waived: true, waiver };
const failingCheck: CheckResultDto = { id: 'eq-response', kind: 'magnitude-envelope', label: 'response', pass: false, measured: 2.3, limit: 1, margin: -1.3, unit: 'dB', worstHz: 8020, waiver: null };
const passingCheck: CheckResultDto = { id: 'latency', kind: 'timing', label: null, pass: true, measured: 3.5, limit: 10, margin: 6.5, unit: 'ms', worstHz: null, waiver: null };

describe('a waiver where it matters', () => {
  it('matrix: a cell passing with waiver says so with its date and lists no waived check as failing', () => {
    const matrix: Matrix = {
      build: summary,
      testCases: [{ key: 'eq.music.sweep', name: 'Music EQ sweep' }],
      targets: [
        { key: 'evt2-48k', name: 'EVT2 48 kHz' },
        { key: 'host-sim', name: 'Host simulation' },
      ],
      cells: [
        { testCase: 'eq.music.sweep', target: 'evt2-48k', captureId: 'cap-1', outcome: 'pass', failing: [waivedCheck], previous: 'fail', waiver },
        { testCase: 'eq.music.sweep', target: 'host-sim', captureId: 'cap-2', outcome: 'fail', failing: [failingCheck, waivedCheck], previous: 'fail', waiver: null },
      ],
      compared: null,
    };
    render(
      <MemoryRouter>
        <BuildMatrix projectKey="kestrel-buds" matrix={matrix} />
      </MemoryRouter>,
    );
    const waived = document.querySelector<HTMLElement>('td[data-target="evt2-48k"]')!;
    expect(waived.dataset.outcome).toBe('pass');
    expect(waived.textContent).toContain(`Passed with waiver, until ${formatDate(until)}`);
    expect(waived.textContent).not.toContain('hf-level');
    const failing = document.querySelector<HTMLElement>('td[data-target="host-sim"]')!;
    expect(failing.textContent).toContain('response');
    expect(failing.textContent).not.toContain('Passed with waiver');
    expect(failing.textContent).not.toContain('more failing check'); // the waived one is not counted as failing
  });

  it('builds table counts: the captures passing with waiver are counted after the verdicts', () => {
    render(<VerdictCounts counts={{ pass: 3, fail: 1, error: 0, pending: 0, waived: 2 }} />);
    const item = document.querySelector<HTMLElement>('li[data-waived]')!;
    expect(item.title).toBe('Passed with waiver: 2');
    expect(item.textContent).toBe('2 of them passed with waiver');
  });

  it('builds table counts: nothing about waivers when none applies', () => {
    render(<VerdictCounts counts={{ pass: 3, fail: 1, error: 0, pending: 0, waived: 0 }} />);
    expect(document.querySelector('li[data-waived]')).toBeNull();
  });

  it('capture page: the verdict reads "Passed with waiver, until <date>" and the waived check its own date', () => {
    const detail = {
      capture: {
        id: 'cap-1', projectKey: 'kestrel-buds', buildSha: SHA, testCase: 'eq.music.sweep', target: 'evt2-48k', status: 'done', sha256: 'e'.repeat(64), sizeBytes: 1,
        sampleRate: 48000, channels: 1, frames: 48000, createdAt: '2025-06-12T14:03:11.000Z', purgedAt: null,
        verdict: {
          outcome: 'pass', reason: 'passed with waiver: hf-level', engineVersion: '1.0.0', maskRevisionId: 'mr-1', maskRevision: 1, createdAt: '2025-06-12T14:05:00.000Z',
          checks: [waivedCheck, passingCheck], waiver, previousOutcome: 'fail',
        },
        links: { self: '/x', build: '/y', dashboard: '/z' },
      },
      testCase: { key: 'eq.music.sweep', name: 'Music EQ sweep', stimulusKind: 'sweep' },
      target: { key: 'evt2-48k', name: 'EVT2 48 kHz' },
      build: summary,
      mask: null,
      findings: [],
      lastPassing: null,
    } satisfies CaptureDetail;
    render(
      <MemoryRouter>
        <CaptureHeader detail={detail} />
        <ChecksTable checks={detail.capture.verdict.checks} />
      </MemoryRouter>,
    );
    expect(screen.getByText(`Passed with waiver, until ${formatDate(until)}`)).toBeTruthy();
    const row = document.querySelector<HTMLElement>('tr[data-check-id="hf-level"]')!;
    expect(within(row).getByText(`Waived until ${formatDate(until)}`)).toBeTruthy();
    expect(row.className).not.toContain('bg-fail-soft');
    expect(document.querySelector<HTMLElement>('tr[data-check-id="latency"]')!.textContent).not.toContain('Waived');
    expect(screen.getByText(/failed/).textContent).toBe('1 of 2 failed (1 waived)');
  });

  it('findings triage never offers "accepted deviation": only an approved waiver sets it', () => {
    expect(stateOptions.map((o) => o.value)).toEqual(['open', 'investigating', 'fixed', 'not_a_defect']);
  });
});
