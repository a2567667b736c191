/**
 * Rainflow cycle counting as ASTM E1049-85 (reapproved 2017), sec. 5.4.4 words it, on a stream of
 * samples: turning points are taken from the samples as they arrive (a run of equal values is one
 * point), and only the not-yet-closed residue is kept, so memory stays small for a stationary record.
 *
 *   1. read the next peak or valley;  2. with fewer than three points go to 1, else let X be the range
 *   of the newest two points and Y the range of the two before;  3. if X < Y go to 1;
 *   4. if Y contains the starting point S go to 5, else count Y as one cycle, drop its two points, go to 2;
 *   5. count Y as one half cycle, drop its first point (S moves on), go to 2;
 *   6. at the end, count every range left as one half cycle.
 *
 * Each counted range adds weight x (range / 2)^b to the damage sum (Miner's rule with Basquin's
 * N S^b = C on the amplitude S; divide by C, and scale by K^b for a stress factor K).
 */
export interface RainflowCycle {
  range: number;
  /** 1 for a full cycle, 0.5 for a half. */
  count: number;
}

export class RainflowCounter {
  private stack = new Float64Array(64);
  private head = 0;
  private size = 0;
  private last = NaN;
  /** Direction of the current run: +1 rising, -1 falling, 0 before the first change. */
  private dir = 0;
  private damage = 0;
  private readonly b: number;
  /** b when it is a whole number from 1 to 64 (powers by squaring, several times faster than Math.pow), else 0. */
  private readonly bInt: number;
  private readonly record: RainflowCycle[] | undefined;

  /** `basquinB` sets the damage exponent; `keepCycles` keeps the list of cycles (tests, small records). */
  constructor(basquinB: number, keepCycles = false) {
    this.b = basquinB;
    this.bInt = Number.isInteger(basquinB) && basquinB >= 1 && basquinB <= 64 ? basquinB : 0;
    this.record = keepCycles ? [] : undefined;
  }

  /** Samples x[0..count). Non-finite samples are skipped. */
  push(x: Float64Array | readonly number[], count = x.length): void {
    // Locals in the loop (this is the hot path of the time-domain damage: every sample of every natural frequency).
    let last = this.last;
    let dir = this.dir;
    for (let i = 0; i < count; i++) {
      const v = x[i]!;
      if (v - v !== 0) continue; // NaN or infinite
      if (last !== last) {
        last = v;
        continue;
      }
      if (v === last) continue;
      const d = v > last ? 1 : -1;
      // A reversal makes the previous sample a turning point (the first sample is always one: dir starts at 0).
      if (d !== dir) this.point(last);
      dir = d;
      last = v;
    }
    this.last = last;
    this.dir = dir;
  }

  private point(p: number): void {
    if (this.head + this.size === this.stack.length) {
      if (this.head > 0) {
        this.stack.copyWithin(0, this.head, this.head + this.size);
        this.head = 0;
      } else {
        const s = new Float64Array(this.stack.length * 2);
        s.set(this.stack);
        this.stack = s;
      }
    }
    const st = this.stack;
    let head = this.head;
    let size = this.size + 1;
    st[head + size - 1] = p;
    const b = this.b;
    const bInt = this.bInt;
    const keep = this.record !== undefined;
    let damage = this.damage;
    while (size >= 3) {
      const e = head + size - 1;
      const x = Math.abs(st[e]! - st[e - 1]!);
      const y = Math.abs(st[e - 1]! - st[e - 2]!);
      if (x < y) break;
      if (e - 2 === head) {
        damage += 0.5 * (bInt > 0 ? powInt(y / 2, bInt) : Math.pow(y / 2, b));
        if (keep) this.record!.push({ range: y, count: 0.5 });
        head++;
        size--;
      } else {
        damage += bInt > 0 ? powInt(y / 2, bInt) : Math.pow(y / 2, b);
        if (keep) this.record!.push({ range: y, count: 1 });
        st[e - 2] = st[e]!;
        size -= 2;
      }
    }
    this.head = head;
    this.size = size;
    this.damage = damage;
  }

  private count(range: number, weight: number): void {
    this.damage += weight * (this.bInt > 0 ? powInt(range / 2, this.bInt) : Math.pow(range / 2, this.b));
    this.record?.push({ range, count: weight });
  }

  /** Closes the record (step 6) and returns sum of weight x (range / 2)^b; the counter is spent. */
  finish(): number {
    if (!Number.isNaN(this.last)) this.point(this.last);
    this.last = NaN;
    const st = this.stack;
    for (let i = this.head; i + 1 < this.head + this.size; i++) this.count(Math.abs(st[i + 1]! - st[i]!), 0.5);
    this.size = 0;
    return this.damage;
  }

  /** The cycles counted so far (only with keepCycles). */
  cycles(): RainflowCycle[] {
    return this.record ?? [];
  }
}

/** x^n for a whole n >= 1 by repeated squaring (within a few ulp of Math.pow). */
function powInt(x: number, n: number): number {
  let r = 1;
  let p = x;
  let e = n;
  while (e > 0) {
    if (e & 1) r *= p;
    p *= p;
    e >>= 1;
  }
  return r;
}
