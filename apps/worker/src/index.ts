export { startBoss } from './boss.js';
export { createQueues } from './queues.js';
export { loadWorkerEnv, type WorkerEnv } from './env.js';
