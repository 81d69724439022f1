import type { EntityManager } from '@mikro-orm/postgresql';
import { MaskDocument, StimulusSpec, subscribesToBuildMailByDefault } from '@earmark/contracts';
import { ApiToken, MaskRevision, Membership, Project, Target, TestCase, User, testCaseSettings } from '../entities/index.js';
import { hashPassword } from '../users/passwords.js';
import { DEMO_HISTORY_DAYS, DEMO_PASSWORD, demoProjects, demoUsers } from './demo-scenario.js';

export interface DemoCiToken {
  token: string;
  prefix: string;
  hash: string;
}

export interface SeedResult {
  created: boolean;
}

/**
 * Seeds the demo scenario once. Idempotent: when the first demo project exists the
 * database is left as it is (a second `npm start` adds nothing).
 * @param ciToken the demo CI token for kestrel-buds (its secret is kept by the caller).
 */
export async function seedDemo(em: EntityManager, ciToken: DemoCiToken): Promise<SeedResult> {
  if (await em.findOne(Project, { key: demoProjects[0].key })) return { created: false };
  const passwordHash = await hashPassword(DEMO_PASSWORD, 10);
  // The projects and their first masks predate the demo history, so the story reads in order.
  const agreedAt = new Date(Date.now() - (DEMO_HISTORY_DAYS + 2) * 86_400_000);
  await em.transactional(async (tx) => {
    const users = demoUsers.map((u) =>
      tx.create(User, { email: u.email, displayName: u.displayName, isAdmin: u.isAdmin, passwordHash }),
    );
    for (const p of demoProjects) {
      const project = tx.create(Project, { key: p.key, name: p.name, description: p.description, createdAt: agreedAt });
      for (const t of p.targets) tx.create(Target, { project, key: t.key, name: t.name, sampleRate: t.sampleRate });
      const engineer = users[demoUsers.findIndex((u) => u.role === 'engineer')]!;
      const qa = users[demoUsers.findIndex((u) => u.role === 'qa_manager')]!;
      for (const c of p.testCases) {
        const testCase = tx.create(TestCase, { project, key: c.key, name: c.name, stimulus: StimulusSpec.parse(c.stimulus), channelMap: [], createdAt: agreedAt });
        // Revision 1 of each mask: drafted by the engineer, approved by the QA manager.
        if (!c.mask) continue;
        tx.create(MaskRevision, {
          testCase,
          revision: 1,
          state: 'approved',
          checks: MaskDocument.parse({ checks: c.mask }).checks,
          note: 'Initial limits agreed for the demo.',
          settings: testCaseSettings(testCase),
          author: engineer,
          reviewer: qa,
          createdAt: agreedAt,
          submittedAt: agreedAt,
          decidedAt: agreedAt,
        });
      }
      demoUsers.forEach((u, i) => {
        if (u.role) tx.create(Membership, { project, user: users[i]!, role: u.role, subscribed: subscribesToBuildMailByDefault(u.role) });
      });
      if (p.key === 'kestrel-buds') {
        tx.create(ApiToken, {
          project,
          name: 'demo pipeline',
          prefix: ciToken.prefix,
          secretHash: ciToken.hash,
          scopes: ['submit-captures', 'read-verdicts'],
          createdBy: users[0]!,
        });
      }
    }
  });
  return { created: true };
}
