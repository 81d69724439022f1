import { formatMargin, formatQuantity, type DriftFlag } from '@earmark/contracts';
import type { Links } from '../services/links.js';
import type { MailMessage } from './mail-message.js';
import { renderMail } from './render-mail.js';

export interface DriftMailInput {
  project: { key: string; name: string };
  build: { sha: string; branch: string };
  flag: Pick<DriftFlag, 'testCase' | 'target' | 'checkId' | 'shrinkDb' | 'builds' | 'bestMargin' | 'bestSha' | 'latestMargin' | 'thresholdDb'>;
  links: Pick<Links, 'buildPage' | 'settingsPage'>;
}

/** To the project's subscribers: a check still passes but its margin shrank past the project's threshold. */
export function composeDriftMail({ project, build, flag, links }: DriftMailInput): MailMessage {
  return renderMail({
    kind: 'drift',
    subject: `[Earmark] ${project.key} ${build.branch}: ${flag.checkId} on ${flag.testCase}/${flag.target} is drifting`,
    blocks: [
      {
        type: 'paragraph',
        content: [
          `The margin of check ${flag.checkId} (${flag.testCase} on ${flag.target}) still passes but shrank by ${formatQuantity(flag.shrinkDb, 'dB')} ` +
            `over the last ${flag.builds} builds of ${build.branch}: from ${formatMargin(flag.bestMargin, 'dB')} (build ${flag.bestSha.slice(0, 10)}) to ${formatMargin(flag.latestMargin, 'dB')} (build ${build.sha.slice(0, 10)}).`,
        ],
      },
      { type: 'paragraph', content: [`The project flags a shrink of more than ${formatQuantity(flag.thresholdDb, 'dB')}.`] },
      { type: 'paragraph', content: ['Open the build: ', { href: links.buildPage(project.key, build.sha) }] },
    ],
    footer: {
      reason: `You get this because you subscribed to build-failure mail of ${project.name}; drift notices come with it.`,
      manage: { text: 'Change it on the project page', href: links.settingsPage(project.key) },
    },
    payload: { project: project.key, sha: build.sha, testCase: flag.testCase, target: flag.target, checkId: flag.checkId },
  });
}
