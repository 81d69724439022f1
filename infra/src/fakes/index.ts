export * from './s3-fake.js';
export * from './smtp-fake.js';
