import type { Command } from 'commander';

// Filled in by the engine work: `earmark stimulus --kind … -o out.wav`.
export function registerStimulusCommand(_program: Command): void {}
