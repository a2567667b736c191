/** Builds WAV files byte by byte for reader tests: any encoding, extra chunks, broken headers. */
export interface WavSpec {
  tag?: number; // 1 PCM, 3 float
  bits: number;
  channels: number;
  sampleRate?: number;
  /** Interleaved integer codes (PCM) or floats. */
  samples: number[];
  extensible?: boolean;
  /** WAVE_FORMAT_EXTENSIBLE's wValidBitsPerSample (default: bits); the codes are given already left-justified. */
  validBits?: number;
  /** Chunks before 'data' (id, body). */
  extraChunks?: [string, Buffer][];
  blockAlign?: number;
}

export function wavBytes(s: WavSpec): Buffer {
  const tag = s.tag ?? 1;
  const bps = s.bits / 8;
  const data = Buffer.alloc(s.samples.length * bps);
  s.samples.forEach((v, i) => {
    const o = i * bps;
    if (tag === 3 && s.bits === 32) data.writeFloatLE(v, o);
    else if (tag === 3 && s.bits === 64) data.writeDoubleLE(v, o);
    else if (s.bits === 8) data.writeUInt8(v, o);
    else if (s.bits === 16) data.writeInt16LE(v, o);
    else if (s.bits === 24) data.writeIntLE(v, o, 3);
    else if (s.bits === 32) data.writeInt32LE(v, o);
  });
  const fmt = Buffer.alloc(s.extensible ? 40 : 16);
  fmt.writeUInt16LE(s.extensible ? 0xfffe : tag, 0);
  fmt.writeUInt16LE(s.channels, 2);
  fmt.writeUInt32LE(s.sampleRate ?? 1000, 4);
  fmt.writeUInt32LE((s.sampleRate ?? 1000) * s.channels * bps, 8);
  fmt.writeUInt16LE(s.blockAlign ?? s.channels * bps, 12);
  fmt.writeUInt16LE(s.bits, 14);
  if (s.extensible) {
    fmt.writeUInt16LE(22, 16);
    fmt.writeUInt16LE(s.validBits ?? s.bits, 18);
    fmt.writeUInt32LE(0, 20);
    fmt.writeUInt16LE(tag, 24); // SubFormat GUID, first two bytes
    Buffer.from("000000001000800000aa00389b71", "hex").copy(fmt, 26);
  }
  const chunk = (id: string, body: Buffer) => {
    const h = Buffer.alloc(8);
    h.write(id, 0, "latin1");
    h.writeUInt32LE(body.length, 4);
    return Buffer.concat([h, body, body.length & 1 ? Buffer.alloc(1) : Buffer.alloc(0)]);
  };
  const parts = [chunk("fmt ", fmt), ...(s.extraChunks ?? []).map(([id, b]) => chunk(id, b)), chunk("data", data)];
  const body = Buffer.concat([Buffer.from("WAVE", "latin1"), ...parts]);
  const h = Buffer.alloc(8);
  h.write("RIFF", 0, "latin1");
  h.writeUInt32LE(body.length, 4);
  return Buffer.concat([h, body]);
}

/** A RIFF file rebuilt as RF64 (EBU Tech 3306): a ds64 chunk first, the 32-bit sizes 0xFFFFFFFF. */
export function asRf64(riff: Buffer, magic = "RF64"): Buffer {
  const body = riff.subarray(12);
  const dataAt = body.indexOf("data", 0, "latin1");
  const dataBytes = body.readUInt32LE(dataAt + 4);
  const ds64 = Buffer.alloc(36);
  ds64.write("ds64", 0, "latin1");
  ds64.writeUInt32LE(28, 4);
  const copy = Buffer.from(body);
  copy.writeUInt32LE(0xffffffff, dataAt + 4);
  const h = Buffer.alloc(12);
  h.write(magic, 0, "latin1");
  h.writeUInt32LE(0xffffffff, 4);
  h.write("WAVE", 8, "latin1");
  ds64.writeBigUInt64LE(BigInt(4 + 36 + copy.length), 8);
  ds64.writeBigUInt64LE(BigInt(dataBytes), 16);
  ds64.writeBigUInt64LE(0n, 24);
  return Buffer.concat([h, ds64, copy]);
}
