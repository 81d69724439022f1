export * from './entities/index.js';
export * from './config.js';
export * from './orm.js';
