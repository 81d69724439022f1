export * from './boss.js';
export * from './queues.js';
