import { execFileSync } from "node:child_process";
import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { asRf64, wavBytes } from "../wavBytes.js";

/** The corpus cases that are binary or large: written into `dir` at test time. */
export function generateCases(dir: string): void {
  const pcm = (n: number) => Array.from({ length: n }, (_, i) => Math.round(8000 * Math.sin(i * 0.7)));
  writeFileSync(
    join(dir, "utf16.csv"),
    Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from("time,ax\n0,1\n0.01,2\n", "utf16le")]),
  );
  writeFileSync(join(dir, "binary.csv"), Buffer.from([0x50, 0x4b, 3, 4, 0, 0, 8, 0, 255, 10, 0, 1]));
  writeFileSync(join(dir, "long-line.csv"), "time,ax\n0,1\n0.01," + "7".repeat(3 << 20) + "\n");
  writeFileSync(join(dir, "empty.wav"), Buffer.alloc(0));
  writeFileSync(
    join(dir, "truncated-header.wav"),
    wavBytes({ bits: 16, channels: 1, samples: pcm(64) }).subarray(0, 30),
  );
  const full = wavBytes({ bits: 16, channels: 1, samples: pcm(64) });
  writeFileSync(join(dir, "truncated-data.wav"), full.subarray(0, full.length - 40));
  writeFileSync(
    join(dir, "alaw.wav"),
    wavBytes({ tag: 6, bits: 8, channels: 1, samples: pcm(64).map((v) => v & 255) }),
  );
  const b12 = wavBytes({ bits: 16, channels: 1, samples: pcm(64) });
  b12.writeUInt16LE(12, 34);
  writeFileSync(join(dir, "pcm12.wav"), b12);
  writeFileSync(join(dir, "zero-channels.wav"), wavBytes({ bits: 16, channels: 0, samples: [], blockAlign: 0 }));
  const big = wavBytes({ bits: 16, channels: 1, samples: pcm(64) });
  big.writeUInt32LE(1 << 30, 40);
  writeFileSync(join(dir, "data-too-large.wav"), big);
  writeFileSync(join(dir, "not-riff.wav"), "time,ax\n0,1\n");
  writeFileSync(
    join(dir, "data-before-fmt.wav"),
    Buffer.concat([
      Buffer.from("RIFF\x1c\x00\x00\x00WAVEdata\x02\x00\x00\x00\x01\x00", "latin1"),
      Buffer.from("fmt ", "latin1"),
    ]),
  );
  writeFileSync(
    join(dir, "extensible.wav"),
    wavBytes({ tag: 3, bits: 32, channels: 1, samples: pcm(64).map((v) => v / 32768), extensible: true }),
  );
  // Whole-millisecond stamps (resolution 1 ms) for 300 k rows, then 1.4 ms steps printed to 0.1 ms.
  let ms = "time,ax\n";
  for (let i = 0; i < 300000; i++) ms += `${(i / 1000).toFixed(3)},${(i % 7) / 10}\n`;
  for (let k = 0; k < 1000; k++) ms += `${(300 + k * 0.0014).toFixed(4)},${(k % 7) / 10}\n`;
  writeFileSync(join(dir, "ms-then-1.4ms.csv"), ms);
  const fmt16 = wavBytes({ bits: 16, channels: 1, samples: pcm(64) });
  const fmtChunk = fmt16.subarray(12, 36);
  writeFileSync(
    join(dir, "two-fmt.wav"),
    wavBytes({ bits: 16, channels: 1, samples: pcm(64), extraChunks: [["fmt ", fmtChunk.subarray(8)]] }),
  );
  const dataChunk = fmt16.subarray(36);
  const twoData = Buffer.concat([fmt16, dataChunk]);
  twoData.writeUInt32LE(twoData.length - 8, 4);
  writeFileSync(join(dir, "two-data.wav"), twoData);
  const guid = wavBytes({ tag: 3, bits: 32, channels: 1, samples: pcm(64).map((v) => v / 32768), extensible: true });
  guid.writeUInt8(guid.readUInt8(59) ^ 0xff, 59); // last byte of the sub-format GUID (fmt body at 20, GUID at 24..39)
  writeFileSync(join(dir, "bad-guid.wav"), guid);
  writeFileSync(
    join(dir, "bad-calibration.wav"),
    wavBytes({
      bits: 16,
      channels: 1,
      samples: pcm(64),
      extraChunks: [["pgcl", Buffer.from('{"unit":"furlong/fortnight2"}')]],
    }),
  );
  const noDs64 = wavBytes({ bits: 16, channels: 1, samples: pcm(64) });
  noDs64.write("RF64", 0, "latin1");
  writeFileSync(join(dir, "rf64-no-ds64.wav"), noDs64);
  writeFileSync(
    join(dir, "odd-chunk.wav"),
    wavBytes({ bits: 16, channels: 1, samples: pcm(64), extraChunks: [["LIST", Buffer.from("odd")]] }),
  );
  writeFileSync(
    join(dir, "two-calibrations.wav"),
    wavBytes({
      bits: 16,
      channels: 1,
      samples: pcm(64),
      extraChunks: [
        ["pgcl", Buffer.from('{"unit":"g","scale":2}')],
        ["pgcl", Buffer.from('{"unit":"g","scale":5}')],
      ],
    }),
  );
  writeFileSync(
    join(dir, "valid-bits-over.wav"),
    wavBytes({ bits: 16, channels: 1, samples: pcm(64), extensible: true, validBits: 24 }),
  );
  const unfinished = wavBytes({ bits: 16, channels: 2, samples: pcm(128) });
  unfinished.writeUInt32LE(0, unfinished.indexOf("data", 12, "latin1") + 4);
  unfinished.writeUInt32LE(0, 4);
  writeFileSync(join(dir, "unfinished-cut-frame.wav"), Buffer.concat([unfinished, Buffer.from([7, 7, 7])]));
  writeFileSync(join(dir, "no-wav-name.rf64"), asRf64(wavBytes({ bits: 16, channels: 1, samples: pcm(64) })));
  // Issue #12: hostile inputs. Named pipes (they must never block a read), memory bombs, deep profiles.
  execFileSync("mkfifo", [join(dir, "fifo.csv"), join(dir, "fifo-profile.json"), join(dir, "fifo-list.txt")]);
  const wide = (n: number, name: (i: number) => string) =>
    `time,${Array.from({ length: n }, (_, i) => name(i)).join(",")}\n0,${"1,".repeat(n - 1)}1\n0.01,${"2,".repeat(n - 1)}2\n`;
  writeFileSync(
    join(dir, "wide-32000.csv"),
    wide(32000, (i) => `c${i}`),
  );
  writeFileSync(
    join(dir, "wide-1500.csv"),
    wide(1500, (i) => `c${i.toString(36)}`),
  );
  writeFileSync(
    join(dir, "channels-32767.wav"),
    wavBytes({ bits: 16, channels: 32767, samples: new Array(32767 * 2).fill(0) }),
  );
  writeFileSync(
    join(dir, "channels-300.wav"),
    wavBytes({ bits: 16, channels: 300, samples: new Array(300 * 16).fill(1) }),
  );
  writeFileSync(join(dir, "zero-frames.wav"), wavBytes({ bits: 16, channels: 1, samples: [] }));
  writeFileSync(join(dir, "deep.json"), "[".repeat(100000) + "]".repeat(100000));
  writeFileSync(join(dir, "deep-flow.yaml"), "title: " + "[".repeat(100000) + "]".repeat(100000) + "\n");
  writeFileSync(
    join(dir, "deep-block.yaml"),
    Array.from({ length: 40 }, (_, i) => `${" ".repeat(i)}k${i}:`).join("\n") + " 1\n",
  );
  writeFileSync(join(dir, "huge.json"), JSON.stringify({ title: "x".repeat(2 << 20) }));
  writeFileSync(join(dir, "long-header.csv"), `time,${"a".repeat(100 << 10)}\n0,1\n0.01,2\n`);
  writeFileSync(join(dir, "list.txt"), "samples/kb210-run-short.wav\n");
}
