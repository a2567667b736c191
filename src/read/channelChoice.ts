import { InputError, quoted } from "../errors.js";

/** A channel as a caller names it: its name, or its 1-based position (digits in a string, or a number). */
export type ChannelName = string | number;

/**
 * Where a channel name came from, for the error: the option, the file, and the list's own positions when it is a
 * selection.
 */
export interface ChannelChoiceContext {
  option: string;
  file?: string | undefined;
  /**
   * The 1-based position of each entry (default its index + 1): a list of analysed channels keeps the file's positions.
   */
  positions?: readonly number[] | undefined;
  /** What the error says was expected, before the list of channels (default "a channel name or position"). */
  expected?: string | undefined;
}

/**
 * The one way a channel is picked by what a caller wrote: a string is a name (any case) first, then, if it
 * is digits, a 1-based position; a number is always a position (so a channel named "2" cannot shadow it).
 * Anything else is CHANNEL_NOT_FOUND naming the option and listing the channels.
 */
export function channelIndex(
  channels: readonly { name: string }[],
  wanted: ChannelName,
  at: ChannelChoiceContext,
): number {
  const pos = (i: number) => at.positions?.[i] ?? i + 1;
  if (typeof wanted === "string") {
    const byName = channels.findIndex((c) => c.name.toLowerCase() === wanted.toLowerCase());
    if (byName >= 0) return byName;
  }
  const n = typeof wanted === "number" ? wanted : /^\d+$/.test(wanted) ? Number(wanted) : NaN;
  const byPosition = Number.isInteger(n) ? channels.findIndex((_, i) => pos(i) === n) : -1;
  if (byPosition >= 0) return byPosition;
  throw new InputError("CHANNEL_NOT_FOUND", {
    file: at.file,
    option: at.option,
    expected: `${at.expected ?? "a channel name or position"}: ${channels.map((c, i) => `${pos(i)}=${c.name}`).join(", ")}`,
    received: typeof wanted === "number" ? String(wanted) : quoted(wanted),
  });
}

/**
 * channelIndex for each name given; every channel, in order, when none is given. A channel named twice (`-c 1 -c
 * ch1`) is OPTION_INVALID: analysed twice it would count as two spectra in the verdict's per-record split.
 */
export function channelIndices(
  channels: readonly { name: string }[],
  wanted: readonly ChannelName[] | undefined,
  at: ChannelChoiceContext,
): number[] {
  if (wanted === undefined || wanted.length === 0) return channels.map((_, i) => i);
  const out = wanted.map((w) => channelIndex(channels, w, at));
  const twice = out.findIndex((c, i) => out.indexOf(c) !== i);
  if (twice >= 0)
    throw new InputError("OPTION_INVALID", {
      file: at.file,
      option: at.option,
      expected: "each channel once",
      received: `${quoted(String(wanted[out.indexOf(out[twice]!)]))} and ${quoted(String(wanted[twice]))}, both channel ${at.positions?.[out[twice]!] ?? out[twice]! + 1} (${channels[out[twice]!]!.name})`,
    });
  return out;
}
