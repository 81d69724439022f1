import type { CurrentUser, ImpactRunDto, MaskRevisionDto, WaiverDto } from '@earmark/contracts';
import { screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import { json, mockApi, problem, seedSession } from './mock-api';
import { renderApp } from './render-app';

vi.mock('@/app/routes/app/capture', () => ({ CaptureRoute: () => null, captureLoader: () => () => null }));

const qa: CurrentUser = {
  id: 'u-qa',
  email: 'qa@fernwick.test',
  displayName: 'Quinn Abara',
  isAdmin: false,
  memberships: [{ projectKey: 'kestrel-buds', projectName: 'Kestrel Buds', role: 'qa_manager' }],
};

const inReview = (n: number, author: string, contributors: string[] = [author]): MaskRevisionDto => ({
  id: `00000000-0000-4000-8000-00000000020${n}`,
  testCase: n === 1 ? 'eq.sweep' : 'thd.1k',
  target: null,
  revision: n,
  state: 'in_review',
  checks: [{ kind: 'level', id: 'output-level', metric: 'rms-dbfs', min: -21, max: -19 }],
  note: 'Tighter level window',
  author,
  reviewer: null,
  contributors,
  createdAt: '2025-06-01T08:00:00.000Z',
  decidedAt: null,
  submittedAt: '2025-06-01T09:00:00.000Z',
  decisionComment: null,
  basedOn: null,
  settings: {
    stimulus: { kind: 'sine', sampleRate: 48000, channels: 1, seconds: 1, levelDbfs: -20, frequency: 997, fadeInSeconds: 0, fadeOutSeconds: 0 },
    analysis: {},
    channelMap: [],
  },
});

const waiver: WaiverDto = {
  id: '00000000-0000-4000-8000-000000000301',
  project: 'kestrel-buds',
  testCase: 'eq.sweep',
  target: 'rev-b',
  checkId: 'eq-response',
  reason: 'Known tweeter resonance on rev B boards',
  until: '2025-09-30',
  state: 'requested',
  active: false,
  requestedBy: 'eli@fernwick.test',
  decidedBy: null,
  decidedAt: null,
  decisionComment: null,
  findingId: null,
  createdAt: '2025-06-02T08:00:00.000Z',
};

const run = (state: ImpactRunDto['state'], progress: number): ImpactRunDto => ({
  id: 'run-1',
  testCase: 'eq.sweep',
  revision: 1,
  builds: 20,
  state,
  progress,
  total: 40,
  requestedBy: 'qa@fernwick.test',
  createdAt: '2025-06-03T08:00:00.000Z',
  finishedAt: state === 'done' ? '2025-06-03T08:01:00.000Z' : null,
  error: null,
  result:
    state === 'done'
      ? {
          builds: [
            {
              sha: 'b'.repeat(40),
              branch: 'main',
              label: null,
              createdAt: '2025-06-02T08:00:00.000Z',
              current: 'pass',
              draft: 'fail',
              flip: 'pass-to-fail',
              checks: [{ checkId: 'output-level', unit: 'dBFS', current: { pass: true, margin: 0.4 }, draft: { pass: false, margin: -0.3 }, flip: 'pass-to-fail' }],
              captures: [],
            },
          ],
          summary: {
            builds: 1,
            captures: 2,
            passToFail: 1,
            failToPass: 0,
            capturesPassToFail: 1,
            capturesFailToPass: 0,
            worst: [{ checkId: 'output-level', unit: 'dBFS', current: 0.4, draft: -0.3 }],
          },
        }
      : null,
});

function setup(revisions: MaskRevisionDto[] = [inReview(1, 'eli@fernwick.test'), inReview(2, 'qa@fernwick.test')], latestRuns: ImpactRunDto[] = []) {
  seedSession();
  const polls: string[] = [];
  let pollCount = 0;
  const api = mockApi({
    'GET /api/me': () => json(qa),
    'GET /api/projects/kestrel-buds/masks': () => json({ items: revisions }),
    'GET /api/projects/kestrel-buds/waivers': () => json({ items: [waiver] }),
    'GET /api/projects/kestrel-buds/test-cases/eq.sweep/masks/1/impact': () => json({ items: latestRuns }),
    'GET /api/projects/kestrel-buds/test-cases/thd.1k/masks/2/impact': () => json({ items: [] }),
    'POST /api/projects/kestrel-buds/test-cases/eq.sweep/masks/1/impact': () => json(run('queued', 0), 202),
    'GET /api/projects/kestrel-buds/test-cases/eq.sweep/masks/1/impact/run-1': () => {
      pollCount += 1;
      polls.push(`poll ${pollCount}`);
      return json(pollCount === 1 ? run('running', 10) : run('done', 40));
    },
    'POST /api/projects/kestrel-buds/test-cases/eq.sweep/masks/1/approve': () => json({ ...inReview(1, 'eli@fernwick.test'), state: 'approved' }),
    'POST /api/projects/kestrel-buds/test-cases/eq.sweep/masks/1/reject': () => json({ ...inReview(1, 'eli@fernwick.test'), state: 'rejected' }),
    [`POST /api/projects/kestrel-buds/waivers/${waiver.id}/approve`]: () => problem(409, 'Waiver already decided'),
  });
  return { ...api, polls };
}

describe('approvals queue', () => {
  it('approves with the optional comment and rejects only with one', async () => {
    const api = setup();
    renderApp('/projects/kestrel-buds/approvals');
    const user = userEvent.setup();

    expect(await screen.findByRole('heading', { name: 'Approvals' })).toBeTruthy();
    expect(screen.getByRole('link', { name: 'Approvals' })).toBeTruthy();
    const card = await screen.findByRole('article', { name: 'Revision 1 of eq.sweep' });

    await user.click(within(card).getByRole('button', { name: 'Reject' }));
    expect(within(card).getByText('say why the revision is rejected')).toBeTruthy();
    expect(api.requests.some((r) => r.path.endsWith('/reject'))).toBe(false);

    await user.type(within(card).getByLabelText(/Comment/), '  Too tight for rev B  ');
    await user.click(within(card).getByRole('button', { name: 'Reject' }));
    await waitFor(() => expect(api.requests.find((r) => r.path.endsWith('/masks/1/reject'))?.body).toEqual({ comment: 'Too tight for rev B' }));

    expect(await screen.findByText('Revision 1 of eq.sweep: rejected')).toBeTruthy();

    // Approving asks first, saying that nothing has measured the impact yet.
    await user.click(within(card).getByRole('button', { name: 'Approve' }));
    const confirm = await screen.findByRole('dialog', { name: 'Approve revision 1 of eq.sweep?' });
    expect(within(confirm).getByRole('note', { name: 'Impact summary' }).textContent).toContain('No impact run yet: nothing says how recent builds would fare under this revision.');
    expect(api.requests.some((r) => r.path.endsWith('/masks/1/approve'))).toBe(false);
    await user.click(within(confirm).getByRole('button', { name: 'Approve revision 1' }));
    await waitFor(() => expect(api.requests.find((r) => r.path.endsWith('/masks/1/approve'))?.body).toEqual({ comment: 'Too tight for rev B' }));
    expect(await screen.findByText('Revision 1 of eq.sweep: approved')).toBeTruthy();
    expect(screen.getByText('It now judges new captures of eq.sweep.')).toBeTruthy();
    await waitFor(() => expect(screen.queryByRole('dialog', { name: 'Approve revision 1 of eq.sweep?' })).toBeNull());
  });

  it('quotes the finished impact run in the approve confirmation', async () => {
    setup(undefined, [run('done', 40)]);
    renderApp('/projects/kestrel-buds/approvals');
    const user = userEvent.setup();
    const card = await screen.findByRole('article', { name: 'Revision 1 of eq.sweep' });
    await user.click(within(card).getByRole('button', { name: 'Approve' }));
    const confirm = await screen.findByRole('dialog', { name: 'Approve revision 1 of eq.sweep?' });
    expect(within(confirm).getByRole('note', { name: 'Impact summary' }).textContent).toContain('Of the last 1 build (2 captures), 1 would newly fail and 0 would newly pass.');
    await user.click(within(confirm).getByRole('button', { name: 'Cancel' }));
    await waitFor(() => expect(screen.queryByRole('dialog')).toBeNull());
  });

  it('says what a revision changes in words and overlays old and new limits', async () => {
    const envelope = (db: number) => ({ kind: 'magnitude-envelope', id: 'eq-response', measure: 'transfer', smoothing: 6, upper: [{ hz: 20, db: 1.5 }, { hz: 8000, db }, { hz: 20000, db: 1.5 }] });
    const head = { ...inReview(1, 'eli@fernwick.test'), revision: 3, checks: [envelope(1)] } as MaskRevisionDto;
    seedSession();
    const extra = mockApi({
      'GET /api/me': () => json(qa),
      'GET /api/projects/kestrel-buds/masks': () => json({ items: [head] }),
      'GET /api/projects/kestrel-buds/waivers': () => json({ items: [] }),
      'GET /api/projects/kestrel-buds/test-cases/eq.sweep/masks/3/impact': () => json({ items: [] }),
      'GET /api/projects/kestrel-buds/builds': () => json({ items: [], total: 0, page: 1, pageSize: 12 }),
      'GET /api/projects/kestrel-buds/test-cases/eq.sweep/masks/3/diff': () =>
        json({
          testCase: 'eq.sweep',
          base: { revision: 2, state: 'approved', target: null },
          head: { revision: 3, state: 'in_review', target: null },
          checks: [{ id: 'eq-response', kind: 'magnitude-envelope', status: 'changed', changes: [{ path: 'upper.1.db', before: 1.5, after: 1 }], before: envelope(1.5), after: envelope(1) }],
          summary: { added: 0, removed: 0, changed: 1, unchanged: 0 },
          noteChanged: false,
          targetChanged: false,
          settingsChanges: [],
        }),
    });
    renderApp('/projects/kestrel-buds/approvals');
    const card = await screen.findByRole('article', { name: 'Revision 3 of eq.sweep' });
    const words = await within(card).findByRole('list', { name: 'Changes in words' });
    expect([...words.querySelectorAll('[data-change-text]')].map((n) => n.textContent)).toEqual(['upper limit at 8 kHz: +1.50 → +1.00 dB']);
    expect(words.textContent).not.toContain('upper.1.db');
    const legend = within(card).getByRole('list', { name: 'Legend' });
    expect(within(legend).getAllByRole('listitem').map((li) => li.textContent)).toEqual(['Capture', 'Old limits (revision 2)', 'New limits (revision 3)']);
    expect(await within(card).findByText('No capture of this test case in the recent builds to draw the limits over.')).toBeTruthy();
    expect(extra.requests.some((r) => r.path.endsWith('/masks/3/diff'))).toBe(true);
  });

  it('disables the decision for the author, with the reason', async () => {
    setup();
    renderApp('/projects/kestrel-buds/approvals');
    const card = await screen.findByRole('article', { name: 'Revision 2 of thd.1k' });
    const approve = within(card).getByRole('button', { name: 'Approve' }) as HTMLButtonElement;
    expect(approve.disabled).toBe(true);
    expect((within(card).getByRole('button', { name: 'Reject' }) as HTMLButtonElement).disabled).toBe(true);
    const reason = document.getElementById(approve.getAttribute('aria-describedby') ?? '');
    expect(reason?.textContent).toBe('You drafted this revision; another QA manager must approve it');
    // Someone else's waiver can be decided; the API's refusal is shown in its own words.
    const waiverCard = screen.getByRole('article', { name: 'Waiver of eq-response on eq.sweep' });
    const user = userEvent.setup();
    await user.click(within(waiverCard).getByRole('button', { name: 'Approve' }));
    expect(await within(waiverCard).findByText('Waiver already decided')).toBeTruthy();
  });

  it('disables the decision for someone who edited a revision they did not write, with the reason', async () => {
    setup([inReview(1, 'eli@fernwick.test', ['eli@fernwick.test', 'qa@fernwick.test']), inReview(2, 'dana@fernwick.test')]);
    renderApp('/projects/kestrel-buds/approvals');
    const edited = await screen.findByRole('article', { name: 'Revision 1 of eq.sweep' });
    const approve = within(edited).getByRole('button', { name: 'Approve' }) as HTMLButtonElement;
    expect(approve.disabled).toBe(true);
    expect((within(edited).getByRole('button', { name: 'Reject' }) as HTMLButtonElement).disabled).toBe(true);
    expect(document.getElementById(approve.getAttribute('aria-describedby') ?? '')?.textContent).toBe('You edited this revision; someone else must review it.');
    // Someone else's revision the user never touched stays open to them.
    const untouched = screen.getByRole('article', { name: 'Revision 2 of thd.1k' });
    const other = within(untouched).getByRole('button', { name: 'Approve' }) as HTMLButtonElement;
    expect(other.disabled).toBe(false);
    expect(other.getAttribute('aria-describedby')).toBeNull();
    expect(within(untouched).queryByText(/someone else must review it|another QA manager must approve it/)).toBeNull();
  });

  it('starts an impact run and polls its progress until the flips are in', async () => {
    const api = setup();
    renderApp('/projects/kestrel-buds/approvals');
    const user = userEvent.setup();
    const card = await screen.findByRole('article', { name: 'Revision 1 of eq.sweep' });
    await within(card).findByText(/No impact run yet/);

    await user.click(within(card).getByRole('button', { name: 'Run impact' }));
    await waitFor(() => expect(api.requests.find((r) => r.method === 'POST' && r.path.endsWith('/impact'))?.body).toEqual({ builds: 20 }));
    const bar = await within(card).findByRole('progressbar', { name: 'Impact run of revision 1' });
    await waitFor(() => expect(bar.getAttribute('aria-valuenow')).toBe('10'));
    expect(within(card).getByText('Evaluated 10 of 40 captures')).toBeTruthy();

    const table = await within(card).findByRole('table', { name: 'Impact of revision 1 per build' }, { timeout: 4000 });
    expect(within(table).getByText('would now fail')).toBeTruthy();
    expect(within(card).getByRole('table', { name: 'Worst margins of revision 1' }).textContent).toMatch(/−0\.30 dB(?!FS)/);
    expect(api.polls.length).toBe(2);
  });
});
