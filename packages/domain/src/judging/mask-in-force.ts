import type { EntityManager } from '@mikro-orm/postgresql';
import { MaskRevision, type Target, type TestCase } from '@earmark/db';

/** The approved revision for this test case on this target; a target-specific one wins over "all targets". */
export async function findMaskInForce(em: EntityManager, testCase: TestCase, target: Target): Promise<MaskRevision | null> {
  const approved = await em.find(MaskRevision, { testCase, state: 'approved', $or: [{ target }, { target: null }] });
  return approved.find((m) => m.target?.id === target.id) ?? approved.find((m) => m.target === null) ?? null;
}
