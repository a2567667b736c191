/**
 * Limits that bound the memory of one analysis by design, checked before anything is allocated
 * (README "Limits"). A recording or option beyond them is an input error, not an out-of-memory crash.
 *
 * - MAX_CHANNELS: channels of a WAV file or columns of a CSV file. Every channel gets its own block
 *   buffer, moments and spectrum, so a 262 KB WAV that claims 32 767 channels would otherwise take
 *   gigabytes before its first sample.
 * - MAX_SPECTRUM_SAMPLES: analysed channels x segment length. Each channel holds its segment ring
 *   buffer and about two more segments' worth of spectra (sum, PSD, bounds), 8 bytes a value: 2^22
 *   gives at most about 100 MB of spectral buffers (512 channels at 8192 points, 1 at 4194304). The
 *   results built from them (a check's per-line table, a JSON line) are several times larger: a
 *   1024-channel check at 8192 points peaked at 2.9 GB, hence these values.
 */
export const MAX_CHANNELS = 512;
export const MAX_SPECTRUM_SAMPLES = 1 << 22;
