export * from './api-token-secret.js';
export * from './passwords.js';
