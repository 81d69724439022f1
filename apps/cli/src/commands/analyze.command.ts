import type { Command } from 'commander';

// Filled in by the engine work: `earmark analyze <capture.wav> …`.
export function registerAnalyzeCommand(_program: Command): void {}
