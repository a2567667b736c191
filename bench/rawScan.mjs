// The practical limit for reading a numeric CSV: read it in 1 MB pieces and turn every field into a
// double with the plainest possible byte loop (no validation, no storage), one thread.
// node bench/rawScan.mjs FILE  -> prints the checksum
import { openSync, readSync, closeSync } from "node:fs";

const fd = openSync(process.argv[2], "r");
const buf = Buffer.allocUnsafe(1 << 20);
let sum = 0;
let mant = 0;
let frac = 0;
let inFrac = false;
let neg = false;
let any = false;
const P10 = Array.from({ length: 23 }, (_, i) => 10 ** i);
for (;;) {
  const n = readSync(fd, buf, 0, buf.length, null);
  if (n === 0) break;
  for (let i = 0; i < n; i++) {
    const c = buf[i];
    if (c >= 48 && c <= 57) {
      mant = mant * 10 + (c - 48);
      if (inFrac) frac++;
      any = true;
    } else if (c === 46) inFrac = true;
    else if (c === 45) neg = true;
    else {
      if (any) {
        const v = mant / P10[frac];
        sum += neg ? -v : v;
      }
      mant = 0;
      frac = 0;
      inFrac = false;
      neg = false;
      any = false;
    }
  }
}
closeSync(fd);
console.log(sum);
