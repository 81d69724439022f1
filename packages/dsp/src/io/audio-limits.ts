/** Lowest sample rate the engine accepts (Hz). */
export const MIN_SAMPLE_RATE = 8000;
/** Highest sample rate the engine accepts (Hz). */
export const MAX_SAMPLE_RATE = 192000;
/** Most channels a capture may have. */
export const MAX_CHANNELS = 8;
