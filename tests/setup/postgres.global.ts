import { randomBytes } from 'node:crypto';
import type { TestProject } from 'vitest/node';
import { startTestCluster } from '@earmark/infra/test-cluster';
// The provided keys are declared with their consumers, createTestDatabase and the demo snapshot.
import type {} from '@earmark/db/testing';
import { dropSnapshots } from '../support/demo-snapshot.js';

/**
 * Once per run: the private test cluster with a migrated template database. The
 * cluster keeps running afterwards (another run may be using it); `npm test` stops it.
 * The run's id scopes the seeded demo snapshot (tests/support/demo-history.ts), dropped
 * when the run ends or reruns.
 */
export default async function setup(project: TestProject) {
  const { adminUrl, templateDb } = await startTestCluster((l) => console.log(l));
  const runId = randomBytes(6).toString('hex');
  project.provide('pgAdminUrl', adminUrl);
  project.provide('pgTemplateDb', templateDb);
  project.provide('demoSnapshotRun', runId);
  // Watch mode reruns files after an edit: the next file to need the demo seeds it again.
  project.onTestsRerun(() => dropSnapshots(adminUrl, runId));
  return () => dropSnapshots(adminUrl, runId);
}
