import type { TestProject } from 'vitest/node';
import { startTestCluster } from '@earmark/infra/test-cluster';

// The provided keys are declared with their consumer, createTestDatabase.
import type {} from '@earmark/db/testing';

/** Once per run: the private test cluster with a freshly migrated template database. */
export default async function setup(project: TestProject) {
  const { cluster, adminUrl, templateDb } = await startTestCluster((l) => console.log(l));
  project.provide('pgAdminUrl', adminUrl);
  project.provide('pgTemplateDb', templateDb);
  return () => {
    // Keep the cluster for the next run unless asked to stop (npm test stops it at the end).
    if (process.env.EARMARK_TEST_KEEP_CLUSTER !== '1') cluster.stop();
  };
}
