/**
 * The demo scenario: Fernwick Audio Labs, a fictional maker of earbuds and soundbars.
 * Every name here is invented for the demo.
 */
export const DEMO_PASSWORD = 'earmark-demo-2026';

/**
 * The demo history spans this many days up to the moment it is seeded (infra/src/demo-builds.ts);
 * the projects and their first masks date from just before it.
 */
export const DEMO_HISTORY_DAYS = 42;

export const demoUsers = [
  { email: 'admin@fernwick.test', displayName: 'Ilse Brandvold', isAdmin: true, role: null },
  { email: 'qa@fernwick.test', displayName: 'Tomasz Quillan', isAdmin: false, role: 'qa_manager' },
  // A second QA manager, so a revision drafted by one can be approved by the other (four eyes).
  { email: 'qa2@fernwick.test', displayName: 'Saskia Terhoeven', isAdmin: false, role: 'qa_manager' },
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
      { key: 'dvt1-48k', name: 'DVT1 board, 48 kHz', sampleRate: 48000 },
    ],
    testCases: [
      {
        key: 'eq.music.sweep',
        name: 'Music EQ preset, exponential sweep',
        stimulus: { kind: 'sweep', sampleRate: 48000, seconds: 2, levelDbfs: -12, from: 20, to: 20000, silenceSeconds: 0.3, fadeInSeconds: 0.02, fadeOutSeconds: 0.02 },
        mask: [
          { id: 'response', kind: 'magnitude-envelope', label: 'Music EQ within ±1.5 dB', measure: 'transfer', referenceHz: 1000, smoothing: 6, upper: [{ hz: 50, db: 1.5 }, { hz: 16000, db: 1.5 }], lower: [{ hz: 50, db: -1.5 }, { hz: 16000, db: -1.5 }] },
          { id: 'level', kind: 'level', metric: 'rms-dbfs', min: -16, max: -10 },
          { id: 'no-clipping', kind: 'integrity', metric: 'clipped-samples', max: 0 },
          { id: 'latency', kind: 'timing', metric: 'latency-ms', max: 10 },
        ],
      },
      {
        key: 'level.tone.997',
        name: 'Line level, 997 Hz tone at −20 dBFS',
        stimulus: { kind: 'sine', sampleRate: 48000, seconds: 2, levelDbfs: -20, frequency: 997 },
        mask: [
          { id: 'level', kind: 'level', metric: 'rms-dbfs', min: -20.5, max: -19.5 },
          { id: 'thd', kind: 'distortion', metric: 'thd-percent', max: 0.05 },
          { id: 'thdn', kind: 'distortion', metric: 'thdn-db', max: -70 },
        ],
      },
      {
        key: 'voice.uplink.sweep',
        name: 'Voice uplink, exponential sweep (mask not yet agreed)',
        stimulus: { kind: 'sweep', sampleRate: 48000, seconds: 2, levelDbfs: -18, from: 100, to: 8000, silenceSeconds: 0.3 },
        mask: null,
      },
      {
        key: 'noise.idle',
        name: 'Idle channel noise',
        stimulus: { kind: 'silence', sampleRate: 48000, seconds: 2 },
        mask: [
          { id: 'idle-level', kind: 'level', metric: 'rms-dbfs', max: -96 },
          { id: 'dc', kind: 'integrity', metric: 'dc-offset', max: 0.0001 },
        ],
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
        mask: [
          { id: 'crossover-sum', kind: 'magnitude-envelope', label: 'Summed crossover within ±2 dB', measure: 'transfer', referenceHz: 1000, upper: [{ hz: 60, db: 2 }, { hz: 12000, db: 2 }], lower: [{ hz: 60, db: -2 }, { hz: 12000, db: -2 }] },
          { id: 'no-clipping', kind: 'integrity', metric: 'clipped-samples', max: 0 },
        ],
      },
    ],
  },
] as const;
