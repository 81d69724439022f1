export * from './test-database.js';
