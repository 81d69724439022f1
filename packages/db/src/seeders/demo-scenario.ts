/**
 * The demo scenario: Fernwick Audio Labs, a fictional maker of earbuds and soundbars.
 * Every name here is invented for the demo.
 */
export const DEMO_PASSWORD = 'earmark-demo-2026';

export const demoUsers = [
  { email: 'admin@fernwick.test', displayName: 'Ilse Brandvold', isAdmin: true, role: null },
  { email: 'qa@fernwick.test', displayName: 'Tomasz Quillan', isAdmin: false, role: 'qa_manager' },
  { email: 'engineer@fernwick.test', displayName: 'Maren Ostrowe', isAdmin: false, role: 'engineer' },
  { email: 'viewer@fernwick.test', displayName: 'Dorian Felsk', isAdmin: false, role: 'viewer' },
] as const;

export const demoProjects = [
  {
    key: 'kestrel-buds',
    name: 'Kestrel Buds',
    description: 'True-wireless earbuds: ANC, adaptive EQ and a voice pickup path.',
    targets: [
      { key: 'evt2-48k', name: 'EVT2 board, 48 kHz', sampleRate: 48000 },
      { key: 'dvt1-96k', name: 'DVT1 board, 96 kHz', sampleRate: 96000 },
    ],
    testCases: [
      {
        key: 'eq.music.sweep',
        name: 'Music EQ preset, exponential sweep',
        stimulus: { kind: 'sweep', sampleRate: 48000, seconds: 4, levelDbfs: -12, from: 20, to: 20000, silenceSeconds: 0.5, fadeInSeconds: 0.02, fadeOutSeconds: 0.02 },
      },
      {
        key: 'level.tone.997',
        name: 'Line level, 997 Hz tone at −20 dBFS',
        stimulus: { kind: 'sine', sampleRate: 48000, seconds: 2, levelDbfs: -20, frequency: 997 },
      },
      {
        key: 'noise.idle',
        name: 'Idle channel noise',
        stimulus: { kind: 'silence', sampleRate: 48000, seconds: 2 },
      },
    ],
  },
  {
    key: 'heron-bar',
    name: 'Heron Soundbar',
    description: 'Three-channel soundbar with a crossover and dialogue enhancement.',
    targets: [{ key: 'main-48k', name: 'Main board, 48 kHz', sampleRate: 48000 }],
    testCases: [
      {
        key: 'xover.multitone',
        name: 'Crossover, Schroeder multitone',
        stimulus: { kind: 'multitone', sampleRate: 48000, seconds: 3, levelDbfs: -18, from: 40, to: 16000, count: 31, seed: 7 },
      },
    ],
  },
] as const;
