#!/usr/bin/env node
// Runs the TypeScript CLI from source through tsx, so no build step is needed.
import { register } from 'tsx/esm/api';

register();
await import('../src/main.ts');
