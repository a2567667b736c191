// wav-decoder 1.3.0 ships no types; the tests use it as a reference decoder.
declare module "wav-decoder" {
  export interface AudioData {
    numberOfChannels: number;
    length: number;
    sampleRate: number;
    channelData: Float32Array[];
  }
  export interface DecodeOptions {
    symmetric?: boolean;
  }
  export interface Decode {
    (src: ArrayBuffer | Uint8Array, opts?: DecodeOptions): Promise<AudioData>;
    sync(src: ArrayBuffer | Uint8Array, opts?: DecodeOptions): AudioData;
  }
  export const decode: Decode;
}
