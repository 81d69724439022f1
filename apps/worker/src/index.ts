export { startBoss, createQueues } from '@earmark/platform';
export { loadWorkerEnv, type WorkerEnv } from './env.js';
export { createWorker, type Worker } from './create-worker.js';
