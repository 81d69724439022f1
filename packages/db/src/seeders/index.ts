export * from './demo-scenario.js';
export * from './seed-demo.js';
export * from './seed-roles.js';
