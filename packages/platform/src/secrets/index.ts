export * from './api-token-secret.js';
