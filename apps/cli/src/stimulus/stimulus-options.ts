/** The raw flags of `earmark stimulus`, as commander hands them over (strings until validated). */
export interface StimulusFlags {
  spec?: string;
  kind?: string;
  rate?: string;
  seconds?: string;
  level?: string;
  channels?: string;
  frequency?: string;
  frequencies?: string;
  from?: string;
  to?: string;
  count?: string;
  spacing?: string;
  phases?: string;
  seed?: string;
  fadeIn?: string;
  fadeOut?: string;
  silence?: string;
  delay?: string;
  independentChannels?: boolean;
  low?: string;
  high?: string;
  ratio?: string;
  bits: string;
  out: string;
  inverse?: string;
}

/** Flag name → spec field, and how the flag's text becomes the field's value. */
export const FLAG_TO_FIELD: ReadonlyArray<readonly [keyof StimulusFlags, string, 'string' | 'number' | 'numbers' | 'boolean']> = [
  ['kind', 'kind', 'string'],
  ['rate', 'sampleRate', 'number'],
  ['seconds', 'seconds', 'number'],
  ['level', 'levelDbfs', 'number'],
  ['channels', 'channels', 'number'],
  ['frequency', 'frequency', 'number'],
  ['frequencies', 'frequencies', 'numbers'],
  ['from', 'from', 'number'],
  ['to', 'to', 'number'],
  ['count', 'count', 'number'],
  ['spacing', 'spacing', 'string'],
  ['phases', 'phases', 'string'],
  ['seed', 'seed', 'number'],
  ['fadeIn', 'fadeInSeconds', 'number'],
  ['fadeOut', 'fadeOutSeconds', 'number'],
  ['silence', 'silenceSeconds', 'number'],
  ['delay', 'delaySamples', 'number'],
  ['independentChannels', 'independentChannels', 'boolean'],
  ['low', 'lowFrequency', 'number'],
  ['high', 'highFrequency', 'number'],
  ['ratio', 'ratio', 'number'],
];
