// Operations: the Prometheus registry, the metrics and probe server, readiness checks and scrape-time gauges.
// prom-client's metric classes are re-exported so the apps declare their series through this package.
export { Counter, Gauge, Histogram, Registry } from 'prom-client';
export * from './metrics-registry.js';
export * from './metrics-server.js';
export * from './readiness.js';
export * from './scrape-gauge.js';
export * from './queue-gauges.js';
export * from './deadline.js';
