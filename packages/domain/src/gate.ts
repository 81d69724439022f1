import type { ObjectStore } from '@earmark/platform';
import type { Logger } from 'pino';
import { inlineViewsCompute } from './compute/views-compute.js';
import type { ViewsCompute } from './compute/views-tasks.js';
import type { JobProducer } from './jobs/job-producer.js';
import { StimulusFiles } from './services/stimulus-files.js';
import { CaptureIngestService } from './services/capture-ingest.service.js';
import { CaptureViewService } from './services/capture-view.service.js';
import { CaptureReanalysisService } from './services/capture-reanalysis.service.js';
import { CatalogService } from './services/catalog.service.js';
import { DriftService } from './services/drift.service.js';
import { FindingsService } from './services/findings.service.js';
import { ImpactService } from './services/impact.service.js';
import type { Links } from './services/links.js';
import { MaskDerivationService } from './services/mask-derivation.service.js';
import { MaskWorkflowService } from './services/mask-workflow.service.js';
import { MaskService } from './services/mask.service.js';
import { ProjectService } from './services/project.service.js';
import { SubscriptionService } from './services/subscription.service.js';
import { TokenService } from './services/token.service.js';
import { WaiverService } from './services/waiver.service.js';
import { UserAdminService } from './services/user-admin.service.js';

export interface GateDeps {
  objectStore: ObjectStore;
  jobs: JobProducer;
  links: Links;
  logger: Logger;
  /** Where decoding, plots and WAV rendering run; without it, on the calling thread (`inlineViewsCompute`). */
  compute?: ViewsCompute;
  /** The storage quota of projects without their own (EARMARK_PROJECT_QUOTA_BYTES; 0 or unset: unlimited). */
  storageQuotaDefaultBytes?: number;
}

/**
 * Every service of the gate, built once per process by its composition root (the API's
 * `createApiRuntime`, the worker's `createWorker`, the tests through either).
 */
export function createGate(deps: GateDeps) {
  const { objectStore, jobs, links, logger, storageQuotaDefaultBytes } = deps;
  const catalog = new CatalogService();
  const masks = new MaskService(links);
  const findings = new FindingsService();
  const compute = deps.compute ?? inlineViewsCompute();
  const stimuli = new StimulusFiles(objectStore, compute);
  const views = new CaptureViewService(objectStore, findings, links, compute, stimuli);
  return {
    links,
    jobs,
    catalog,
    masks,
    findings,
    views,
    stimuli,
    projects: new ProjectService(storageQuotaDefaultBytes),
    subscriptions: new SubscriptionService(),
    tokens: new TokenService(),
    workflow: new MaskWorkflowService(masks, links),
    waivers: new WaiverService(links),
    ingest: new CaptureIngestService({ objectStore, jobs, links, logger, compute, storageQuotaDefaultBytes }),
    derivation: new MaskDerivationService(views.audioLoader),
    impact: new ImpactService(jobs),
    reanalysis: new CaptureReanalysisService(jobs),
    drift: new DriftService(),
    users: new UserAdminService(links),
  };
}
export type Gate = ReturnType<typeof createGate>;
