import type { TestProject } from 'vitest/node';
import { startTestCluster } from '@earmark/infra/test-cluster';
// The provided keys are declared with their consumer, createTestDatabase.
import type {} from '@earmark/db/testing';

/**
 * Once per run: the private test cluster with a migrated template database. The
 * cluster keeps running afterwards (another run may be using it); `npm test` stops it.
 */
export default async function setup(project: TestProject) {
  const { adminUrl, templateDb } = await startTestCluster((l) => console.log(l));
  project.provide('pgAdminUrl', adminUrl);
  project.provide('pgTemplateDb', templateDb);
}
