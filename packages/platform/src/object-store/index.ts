export * from './object-store.js';
export * from './backup.js';
