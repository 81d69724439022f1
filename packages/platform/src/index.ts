// Infrastructure beside the domain core: the object store, the job queue and secrets.
export * from './object-store/index.js';
export * from './queue/index.js';
export * from './secrets/index.js';
