export * from './entities/index.js';
export * from './config.js';
export * from './orm.js';
export * from './security/index.js';
export * from './seeders/index.js';
export * from './object-store/index.js';
export * from './jobs/index.js';
export * from './domain/index.js';
