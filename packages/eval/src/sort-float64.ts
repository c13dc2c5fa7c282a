const RADIX_MIN_LENGTH = 512;
const LITTLE_ENDIAN = new Uint8Array(Uint32Array.of(1).buffer)[0] === 1;
const LO = LITTLE_ENDIAN ? 0 : 1; // index of the low 32-bit word of a float64 in a Uint32Array view
const HI = 1 - LO;
// Each 32-bit word is sorted in three digits of 11, 11 and 10 bits (2048 counters stay in cache).
const DIGIT_VALUES = 2048;
const SHIFTS = [0, 11, 22];
const MASKS = [0x7ff, 0x7ff, 0x3ff];

/**
 * Sorts a Float64Array ascending in place and returns it, in O(n): an LSD
 * radix sort over the IEEE 754 bit patterns, made order-preserving as
 * unsigned integers by flipping the sign bit of non-negative numbers and
 * every bit of negative ones (common practice, no source), in six passes of
 * 11-, 11- and 10-bit digits per 32-bit word (a pass whose digit is the same
 * for every value is skipped). The order equals `Float64Array.prototype.sort` (−0 before
 * +0, −Infinity first, +Infinity last); arrays shorter than 512 use it.
 * NaN must not occur (callers refuse it first).
 * @example
 * sortFloat64(Float64Array.of(3, -1, 2.5, -0, 0)); // Float64Array [-1, -0, 0, 2.5, 3]
 */
export function sortFloat64(values: Float64Array): Float64Array {
  const n = values.length;
  if (n < RADIX_MIN_LENGTH) return values.sort();
  const words = new Uint32Array(values.buffer, values.byteOffset, 2 * n);
  for (let i = 0; i < 2 * n; i += 2) {
    const hi = words[i + HI] as number;
    if (hi >>> 31 === 1) {
      words[i + HI] = ~hi >>> 0;
      words[i + LO] = ~(words[i + LO] as number) >>> 0;
    } else words[i + HI] = (hi | 0x80000000) >>> 0;
  }
  let from: Uint32Array = words;
  let to: Uint32Array = new Uint32Array(2 * n);
  const counts = new Uint32Array(DIGIT_VALUES);
  for (let pass = 0; pass < 6; pass++) {
    const word = pass < 3 ? LO : HI;
    const shift = SHIFTS[pass % 3] as number;
    const mask = MASKS[pass % 3] as number;
    counts.fill(0);
    for (let i = 0; i < 2 * n; i += 2) {
      const d = ((from[i + word] as number) >>> shift) & mask;
      counts[d] = (counts[d] as number) + 1;
    }
    if (counts[((from[word] as number) >>> shift) & mask] === n) continue; // one digit value: nothing moves
    let offset = 0;
    for (let d = 0; d < DIGIT_VALUES; d++) {
      const c = counts[d] as number;
      counts[d] = offset;
      offset += c;
    }
    for (let i = 0; i < 2 * n; i += 2) {
      const d = ((from[i + word] as number) >>> shift) & mask;
      const p = 2 * (counts[d] as number);
      counts[d] = (counts[d] as number) + 1;
      to[p] = from[i] as number;
      to[p + 1] = from[i + 1] as number;
    }
    const swap = from;
    from = to;
    to = swap;
  }
  for (let i = 0; i < 2 * n; i += 2) {
    const hi = from[i + HI] as number;
    if (hi >>> 31 === 1) from[i + HI] = (hi & 0x7fffffff) >>> 0;
    else {
      from[i + HI] = ~hi >>> 0;
      from[i + LO] = ~(from[i + LO] as number) >>> 0;
    }
  }
  if (from !== words) words.set(from);
  return values;
}
