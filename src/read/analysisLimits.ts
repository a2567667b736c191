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
/**
 * MAX_REPORT_SAMPLES: analysed channels x segment length of an analysis whose result goes into an HTML
 * record. The plots are thinned to what a page shows, but the record embeds every line's numbers (for
 * `verify`, about 8 numbers a line) and lists every excursion. Measured: 2 channels at 102400 points (0.05 Hz
 * lines) made a 23.7 MB record in 14 s and 379 MB. 2^18 (4 channels at 65536 points, 32 at 8192, 1 at
 * 262144) keeps a record near 30 MB. Beyond it `--report` is refused before the recording is read; `--csv`
 * and `--json` hold the full data at any size up to MAX_SPECTRUM_SAMPLES.
 */
export const MAX_REPORT_SAMPLES = 1 << 18;
