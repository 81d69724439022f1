import { describe, expect, it } from 'vitest';
import {
  composeDriftMail,
  composeMaskDecisionMail,
  composeMaskReviewMail,
  composeWaiverDecisionMail,
  composeWaiverExpiredMail,
  composeWaiverRequestMail,
  composeWaiverRevokedMail,
  createLinks,
  escapeHtml,
  renderMail,
} from '../src/index.js';

const links = createLinks('https://earmark.example');
const project = { key: 'heron-bar', name: 'Heron <Soundbar>' };
const quinn = { displayName: 'Quinn Abara', email: 'qa@fernwick.test' };
const emil = { displayName: 'Emil Sato', email: 'emil@fernwick.test' };

describe('renderMail', () => {
  it('writes a text part and an escaped HTML part from the same blocks', () => {
    const mail = renderMail({
      kind: 'test',
      subject: 'S <1>',
      blocks: [
        { type: 'paragraph', content: ['See ', { href: 'https://x.example/?a=1&b=2', text: 'the <page>' }] },
        { type: 'quote', label: 'Note', text: 'line one\n<line> two' },
        { type: 'list', title: 'Items', items: [{ content: ['first'], details: [['detail & more']] }] },
      ],
      footer: { reason: 'Because.' },
      payload: { a: 1 },
    });
    expect(mail.text).toBe('See the <page> (https://x.example/?a=1&b=2)\n\nNote: line one\n  <line> two\n\nItems:\n- first\n  detail & more\n\n-- \nBecause.\n');
    expect(mail.html).toContain('<title>S &lt;1&gt;</title>');
    expect(mail.html).toContain('<p>See <a href="https://x.example/?a=1&amp;b=2">the &lt;page&gt;</a></p>');
    expect(mail.html).toContain('line one<br>&lt;line&gt; two');
    expect(mail.html).toContain('<li>first<br><span style="color:#444">detail &amp; more</span></li>');
    expect(mail.payload).toEqual({ a: 1 });
  });

  it('escapes the five HTML-significant characters', () => {
    expect(escapeHtml(`<a href="x">'&'</a>`)).toBe('&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;');
  });
});

describe('mask-review mail', () => {
  it('tells QA managers what waits for review and where', () => {
    const mail = composeMaskReviewMail({
      project, testCase: 'eq.sweep', revision: 4, target: null, submittedBy: emil, author: emil, checkCount: 3, basedOn: 2,
      note: 'Looser <1 kHz', masksPage: links.masksPage('heron-bar', 'eq.sweep'), approvalsPage: links.approvalsPage('heron-bar'),
    });
    expect(mail.kind).toBe('mask-review');
    expect(mail.subject).toBe('[Earmark] heron-bar: mask eq.sweep revision 4 awaits review');
    expect(mail.text).toContain('Emil Sato (emil@fernwick.test) submitted revision 4 of the tolerance mask for eq.sweep (all targets) in Heron <Soundbar> for review.');
    expect(mail.text).toContain('Author: emil@fernwick.test. Checks: 3. Copied from revision 2.');
    expect(mail.text).toContain('Note: Looser <1 kHz');
    expect(mail.text).toContain('Review it: https://earmark.example/projects/heron-bar/test-cases/eq.sweep/masks');
    expect(mail.text).toContain('All reviews waiting: https://earmark.example/projects/heron-bar/approvals');
    expect(mail.text).toContain('You get this because you are a QA manager of Heron <Soundbar> in Earmark.');
    expect(mail.html).toContain('Looser &lt;1 kHz');
    expect(mail.html).toContain('Heron &lt;Soundbar&gt;');
    expect(mail.payload).toEqual({ project: 'heron-bar', testCase: 'eq.sweep', revision: 4 });
  });
});

describe('mask-decision mail', () => {
  const base = { project, testCase: 'eq.sweep', revision: 4, target: 'evt2', reviewer: quinn, masksPage: links.masksPage('heron-bar', 'eq.sweep') };

  it('tells the author about an approval, with the comment', () => {
    const mail = composeMaskDecisionMail({ ...base, decision: 'approved', comment: 'Matches the <bench>.' });
    expect(mail.kind).toBe('mask-approved');
    expect(mail.subject).toBe('[Earmark] heron-bar: mask eq.sweep revision 4 was approved');
    expect(mail.text).toContain('Quinn Abara (qa@fernwick.test) approved revision 4 of the tolerance mask for eq.sweep (target evt2) in Heron <Soundbar>. It is now the mask in force and judges new captures.');
    expect(mail.text).toContain('Comment: Matches the <bench>.');
    expect(mail.text).toContain('Open the mask: https://earmark.example/projects/heron-bar/test-cases/eq.sweep/masks');
    expect(mail.text).toContain('You get this because you wrote revision 4 of this mask in Earmark.');
    expect(mail.html).toContain('Matches the &lt;bench&gt;.');
    expect(mail.payload).toEqual({ project: 'heron-bar', testCase: 'eq.sweep', revision: 4, decision: 'approved' });
  });

  it('tells the author about a rejection and what to do next; no comment line without a comment', () => {
    const mail = composeMaskDecisionMail({ ...base, decision: 'rejected', comment: null });
    expect(mail.kind).toBe('mask-rejected');
    expect(mail.text).toContain('rejected revision 4');
    expect(mail.text).toContain('copy it to a new draft');
    expect(mail.text).not.toContain('Comment:');
  });
});

describe('waiver mail', () => {
  it('asks QA managers to decide a request', () => {
    const mail = composeWaiverRequestMail({
      project, waiverId: 'w1', findingId: 'f1', findingTitle: 'thd: margin −0.4 %', testCase: 'tone', checkId: 'thd', target: 'evt2',
      until: new Date('2027-03-31T23:59:59.999Z'), reason: 'Codec erratum <14>', requester: emil, approvalsPage: links.approvalsPage('heron-bar'),
    });
    expect(mail.kind).toBe('waiver-requested');
    expect(mail.subject).toBe('[Earmark] heron-bar: waiver requested for tone / thd');
    expect(mail.text).toContain('Emil Sato (emil@fernwick.test) asks to accept a deviation in Heron <Soundbar> until 2027-03-31.');
    expect(mail.text).toContain('- Scope: tone / thd on target evt2');
    expect(mail.text).toContain('Reason: Codec erratum <14>');
    expect(mail.html).toContain('Codec erratum &lt;14&gt;');
    expect(mail.payload).toEqual({ project: 'heron-bar', waiverId: 'w1', findingId: 'f1' });
  });

  it('tells the requester the decision', () => {
    const approved = composeWaiverDecisionMail({
      project, waiverId: 'w1', testCase: 'tone', checkId: 'thd', decision: 'approved', until: new Date('2027-03-31T23:59:59.999Z'),
      decider: quinn, comment: 'Until rev C.', findingsPage: links.findingsPage('heron-bar'),
    });
    expect(approved.kind).toBe('waiver-approved');
    expect(approved.subject).toBe('[Earmark] heron-bar: your waiver for tone / thd was approved');
    expect(approved.text).toContain('Quinn Abara (qa@fernwick.test) approved your waiver for tone / thd in Heron <Soundbar>; it runs until 2027-03-31');
    expect(approved.text).toContain('Comment: Until rev C.');
    expect(approved.text).toContain('You get this because you requested the waiver in Earmark.');
    const rejected = composeWaiverDecisionMail({ ...{ project, waiverId: 'w1', testCase: 'tone', checkId: 'thd', until: new Date(), decider: quinn, findingsPage: '' }, decision: 'rejected', comment: 'No.' });
    expect(rejected.kind).toBe('waiver-rejected');
    expect(rejected.text).toContain('the check keeps failing builds');
  });

  it('tells the assignee that a waiver expired and which findings are open again', () => {
    const mail = composeWaiverExpiredMail({
      project, waiverId: 'w1', testCase: 'tone', checkId: 'thd', target: null, expiredAt: new Date('2027-03-31T23:59:59.999Z'),
      reason: 'Codec erratum', reopened: [{ id: 'f1', title: 'thd <fails>' }], recipientIs: 'assignee',
    });
    expect(mail.kind).toBe('waiver-expired');
    expect(mail.subject).toBe('[Earmark] heron-bar: waiver for tone / thd expired');
    expect(mail.text).toContain('ran until 2027-03-31 and has expired');
    expect(mail.text).toContain('Its finding is open again:\n- thd <fails>');
    expect(mail.text).toContain('You get this because you are assigned the finding in Earmark.');
    expect(mail.html).toContain('thd &lt;fails&gt;');
    expect(mail.payload).toEqual({ project: 'heron-bar', waiverId: 'w1', findingIds: ['f1'] });
  });
});

describe('waiver-revoked mail', () => {
  const base = {
    project, waiverId: 'w1', testCase: 'tone', checkId: 'thd', until: new Date('2027-03-31T23:59:59.999Z'), revokedBy: quinn,
    reason: 'Rev B boards are <retired>.', findingsPage: links.findingsPage('heron-bar'),
  };

  it('tells the requester who revoked which waiver, why, and that the check fails builds again', () => {
    const mail = composeWaiverRevokedMail({ ...base, target: 'evt2', recipientIs: 'requester' });
    expect(mail.kind).toBe('waiver-revoked');
    expect(mail.subject).toBe('[Earmark] heron-bar: waiver for tone / thd on target evt2 revoked by Quinn Abara');
    expect(mail.text).toBe(
      'Quinn Abara (qa@fernwick.test) revoked the waiver for tone / thd on target evt2 in Heron <Soundbar>, which was to run until 2027-03-31.\n\n' +
        'Reason: Rev B boards are <retired>.\n\n' +
        'From now on the check fails builds again: the captures it covered were judged again at once and count it as a failure.\n\n' +
        'Findings: https://earmark.example/projects/heron-bar/findings\n\n' +
        '-- \nYou get this because you requested the waiver in Earmark.\n',
    );
    expect(mail.html).toContain('Rev B boards are &lt;retired&gt;.');
    expect(mail.html).toContain('<a href="https://earmark.example/projects/heron-bar/findings">');
    expect(mail.payload).toEqual({ project: 'heron-bar', waiverId: 'w1', revokedBy: 'qa@fernwick.test' });
  });

  it('names every target for an unscoped waiver and tells the assignee why they get it', () => {
    const mail = composeWaiverRevokedMail({ ...base, target: null, recipientIs: 'assignee' });
    expect(mail.subject).toBe('[Earmark] heron-bar: waiver for tone / thd on every target revoked by Quinn Abara');
    expect(mail.text).toContain('revoked the waiver for tone / thd on every target in Heron <Soundbar>');
    expect(mail.text).toContain('You get this because you are assigned the finding in Earmark.');
  });
});

describe('drift mail', () => {
  it('reports the shrink in dB with both builds and the subscription footer', () => {
    const mail = composeDriftMail({
      project,
      build: { sha: 'd000004abcdef1234', branch: 'main' },
      flag: { testCase: 'eq.sweep', target: 'board', checkId: 'response', shrinkDb: 1.6234, builds: 4, bestMargin: 2.512, bestSha: 'd000001', latestMargin: 0.8886, thresholdDb: 1 },
      links,
    });
    expect(mail.kind).toBe('drift');
    expect(mail.subject).toBe('[Earmark] heron-bar main: response on eq.sweep/board is drifting');
    expect(mail.text).toContain('still passes but shrank by 1.62 dB over the last 4 builds of main: from +2.51 dB (build d000001) to +0.89 dB (build d000004abc).');
    expect(mail.text).toContain('The project flags a shrink of more than 1.00 dB.');
    expect(mail.text).toContain('Open the build: https://earmark.example/projects/heron-bar/builds/d000004abcdef1234');
    expect(mail.text).toContain('Change it on the project page: https://earmark.example/projects/heron-bar#mail');
    expect(mail.payload).toEqual({ project: 'heron-bar', sha: 'd000004abcdef1234', testCase: 'eq.sweep', target: 'board', checkId: 'response' });
  });
});
