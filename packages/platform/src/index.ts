// Infrastructure beside the domain core: the object store, the job queue, secrets and the compute-thread pool.
export * from './object-store/index.js';
export * from './queue/index.js';
export * from './secrets/index.js';
export * from './compute/index.js';
export * from './config/index.js';
export * from './metrics/index.js';
