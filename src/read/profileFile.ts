import { readSmallText } from "./regularFile.js";

/** Largest profile file read: a profile is a few breakpoints and bands (kilobytes); 1 MiB is far beyond any real one. */
export const MAX_PROFILE_BYTES = 1 << 20;

/** The text of a profile file: a regular file (never a FIFO or device), at most MAX_PROFILE_BYTES. */
export async function readProfileText(file: string): Promise<string> {
  return (await readSmallText(file, { what: "a readable profile file", maxBytes: MAX_PROFILE_BYTES, tooLarge: "PROFILE_TOO_LARGE" })).text;
}
