export * from './quantities.js';
export { DASH, MINUS } from './rounding.js';
