export * from './build-status.js';
