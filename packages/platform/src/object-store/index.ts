export * from './object-store.js';
