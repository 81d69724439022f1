export * from './roles.js';
export * from './problem.js';
export * from './auth.js';
export * from './projects.js';
export * from './users.js';
export * from './builds.js';
export * from './stimulus.js';
export * from './queues.js';
