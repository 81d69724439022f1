/** WAVE format tags (Microsoft, mmreg.h; RFC 2361 lists the registry). */
export const WAVE_FORMAT_PCM = 0x0001;
export const WAVE_FORMAT_IEEE_FLOAT = 0x0003;
export const WAVE_FORMAT_EXTENSIBLE = 0xfffe;

/**
 * Bytes 4…15 shared by the KSDATAFORMAT_SUBTYPE_* GUIDs as stored in a file
 * ({0000xxxx-0000-0010-8000-00AA00389B71}); bytes 0…3 hold the format tag, little-endian.
 * Source: Microsoft, "WAVEFORMATEXTENSIBLE" (ksmedia.h).
 */
export const SUBFORMAT_GUID_TAIL: readonly number[] = [
  0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71,
];
