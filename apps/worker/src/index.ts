export { startBoss, createQueues } from '@earmark/db';
export { loadWorkerEnv, type WorkerEnv } from './env.js';
