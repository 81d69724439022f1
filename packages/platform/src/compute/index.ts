export * from './compute-pool.js';
export * from './compute-task.js';
