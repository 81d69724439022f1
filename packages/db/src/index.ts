export * from './entities/index.js';
export * from './config.js';
export * from './orm.js';
export * from './users/passwords.js';
export * from './seeders/index.js';
export * from './notify/channels.js';
