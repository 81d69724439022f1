export * from './test-database.js';
export * from './seeded-database.js';
