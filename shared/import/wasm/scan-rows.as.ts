// AssemblyScript source of the compiled row scanner (see shared/import/wasm/scan-rows-wasm.ts for why it exists and
// how it is used, and shared/import/README.md). Built by `npm run build:wasm` into
// shared/import/wasm/scan-rows-wasm.generated.ts; a unit test
// rebuilds it and fails when the committed bytes differ from what this source gives.
//
// It takes only rows of plain numbers in a fixed delimiter ([-] digits [. digits] [e [sign] digits], exactly
// `width` fields, every one a channel or the time), with the JS scanner's arithmetic: the digits as an integer
// mantissa below 2^53, multiplied or divided once by an exact power of ten up to 1e22 (Clinger's fast path,
// correctly rounded, so bit-identical to parseFloat; f64.mul and f64.div are IEEE 754 round-to-nearest as in JS).
// It stops at the start of the first row it does not take (any other form, a sentinel, a time out of range or not
// increasing, a blank line, a full output) and says where; the JS scanner reads that row and words any error.
//
// Memory, laid out by the caller from heapBase(): the input window (complete lines, at least 8 readable bytes
// after its end), per column its factor (f64) and whether it is the time (i32), and the output, column c's
// value for row r at out + (c * stride + r) * 8.

// Exact powers of ten 1e0 … 1e22 (the largest exactly representable in a double).
const POW10 = memory.data<f64>([
  1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19,
  1e20, 1e21, 1e22,
]);
// 10^n for n = 0 … 8, as integers.
const IPOW10 = memory.data<u64>([1, 10, 100, 1000, 10000, 100000, 1000000, 10000000, 100000000]);

const MAX_EXACT: u64 = 9007199254740991; // 2^53 − 1
const MAX_TIME_SECONDS: f64 = 1e12; // shared/import/value-limits.ts

let stopOffset: i32 = 0;
let timeAfter: f64 = NaN;
let upperCount: i32 = 0;
let lowerCount: i32 = 0;

/** Vertices of the upper and lower hull after the last scan (with a hull). */
export function upperAfter(): i32 {
  return upperCount;
}

export function lowerAfter(): i32 {
  return lowerCount;
}

export function heapBase(): usize {
  return __heap_base;
}

/** Offset (in memory) of the first row not taken by the last scan. */
export function stopAt(): i32 {
  return stopOffset;
}

/** The last time taken by the last scan (its `lastTime` argument when it took no row with a time). */
export function lastTimeAfter(): f64 {
  return timeAfter;
}

// Non-zero in the byte lanes of v that are not '0'–'9'. Exact up to and including the first such lane (a carry
// of the + 6 only moves towards later bytes, and only out of a lane that is not a digit), which is all the
// callers use.
// @ts-ignore: decorator
@inline function nonDigits(v: u64): u64 {
  return ((v & 0xf0f0f0f0f0f0f0f0) | (((v + 0x0606060606060606) & 0xf0f0f0f0f0f0f0f0) >> 4)) ^ 0x3333333333333333;
}

// The number the eight digit values in the byte lanes of d spell (first digit in the lowest byte): pairs, then
// quads, then the eight (Lemire's SWAR digit parsing, as in simdjson's parse_eight_digits_unrolled).
// @ts-ignore: decorator
@inline function eightDigits(d: u64): u64 {
  d = d * 10 + (d >> 8);
  return (((d & 0x000000ff000000ff) * (100 + (1000000 << 32))) + (((d >> 16) & 0x000000ff000000ff) * (1 + (10000 << 32)))) >> 32;
}

// 10^n for n = 0 … 16.
// @ts-ignore: decorator
/** The mantissa after the last digitsFrom (a second result: AssemblyScript functions return one value). */
let runMant: u64 = 0;

/**
 * Reads the run of digits at `q` onto `mant` (runMant: mant·10^k + the run), eight at a time, then the 1–7 left in
 * one more step (the lanes after them shifted out); returns where the run ends. The integer part and the fraction
 * both go through it. Not inlined: only the byte-by-byte reading (longer fields, odd forms) calls it, and two
 * inlined copies of its loop made the module bigger for no measured gain.
 */
function digitsFrom(q: usize, mant: u64): usize {
  let v = load<u64>(q);
  let x = nonDigits(v);
  while (x == 0) {
    mant = mant * 100000000 + eightDigits(v - 0x3030303030303030);
    q += 8;
    v = load<u64>(q);
    x = nonDigits(v);
  }
  const n = <i32>(ctz(x) >> 3);
  if (n != 0) {
    mant = mant * load<u64>(IPOW10 + (<usize>n << 3)) + eightDigits((v - 0x3030303030303030) << (<u64>(8 - n) << 3));
    q += n;
  }
  runMant = mant;
  return q;
}

@inline function ipow10(n: i32): u64 {
  return n <= 8 ? load<u64>(IPOW10 + (<usize>n << 3)) : load<u64>(IPOW10 + (<usize>(n - 8) << 3)) * 100000000;
}

// The number the n digits (1 … 16) at p spell; reads 8 or 16 bytes from p.
// @ts-ignore: decorator
@inline function digitRun(p: usize, n: i32): u64 {
  if (n <= 8) return eightDigits((load<u64>(p) - 0x3030303030303030) << (<u64>(8 - n) << 3));
  return eightDigits(load<u64>(p) - 0x3030303030303030) * load<u64>(IPOW10 + (<usize>(n - 8) << 3))
    + eightDigits((load<u64>(p + 8) - 0x3030303030303030) << (<u64>(16 - n) << 3));
}

// The double a field spells, from its sign, its digits as an integer `mant` and its power of ten: one exact IEEE
// multiplication or division (Clinger's fast path); NaN when the field is outside that path (the JS scanner reads
// it). NaN is never a field's value here, as only digits are read.
// @ts-ignore: decorator
@inline function exactValue(neg: bool, mant: u64, exp10: i32): f64 {
  if (mant > MAX_EXACT) return NaN;
  let value: f64 = 0;
  if (mant == 0) value = 0;
  else if (exp10 == 0) value = <f64>mant;
  else if (exp10 > 0 && exp10 <= 22) value = <f64>mant * load<f64>(POW10 + (<usize>exp10 << 3));
  else if (exp10 < 0 && exp10 >= -22) value = <f64>mant / load<f64>(POW10 + (<usize>(-exp10) << 3));
  else return NaN;
  return neg ? -value : value;
}

// The row shape: a scope writes its rows with one printf format, so a row is usually laid out as the one before
// it, byte for byte, but for which digits it holds. The last row the field-by-field reading took is kept as such a
// shape (its bytes with every digit replaced by '0', up to SHAPE_BYTES long, line end included) with where each
// field's digits are. The rows after it that have the same shape (up to BATCH_ROWS of them) are then read as a
// batch at those places without looking for their fields, one column at a time (readShapeColumn), and their times
// checked and pushed on the hull after. Their fields give the same doubles as the field-by-field reading would
// (the same exact power of ten, one IEEE division or multiplication), and every check that depends on the digits'
// values (the range of the exponent, sentinels, the time) is made again; the batch ends before a row that fails
// one, and that row goes to the field-by-field reading, which then takes it or stops at it as before.
const SHAPE_BYTES = 48;
const SHAPE_FIELDS = 24; // at most SHAPE_BYTES / 2 fields fit in a shape
// Per field, 8 bytes: offset of the integer digits, their count, offset of the fraction's digits, their count,
// offset of the exponent's digits, their count, minus sign, exponent's minus sign (offsets from the row's start).
const SHAPE_FIELD_INFO = memory.data(SHAPE_FIELDS * 8, 8);
const SHAPE = memory.data(SHAPE_BYTES, 16);
// Per field, 16 lanes for i8x16.swizzle from its first digit on: its mantissa's digits right-aligned, zeros before.
const SHAPE_DIGIT_LANES = memory.data(SHAPE_FIELDS * 16, 16);
const IOTA = memory.data<u8>([0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15]);
// Length of the row shape in bytes, 0 for none.
let shapeLength: i32 = 0;

// The shape's bytes (digits as '0') and, per lane, the largest value the lane's byte XOR the shape's may have:
// 9 where the shape has a digit, 0 where it has another byte, 255 past its end (any byte: the next row's).
const SHAPE_LIMIT = memory.data(SHAPE_BYTES, 16);

// @ts-ignore: decorator
@inline function shapeVector(p: usize, k: usize): v128 {
  const x = v128.xor(v128.load(p + k), v128.load(SHAPE + k));
  const lim = v128.load(SHAPE_LIMIT + k);
  return i8x16.eq(i8x16.max_u(x, lim), lim);
}

// The row at p has the shape (it ends inside the window: the caller checks p + shapeLength <= end).
// @ts-ignore: decorator
@inline function hasShape(p: usize): bool {
  return i8x16.all_true(v128.and(v128.and(shapeVector(p, 0), shapeVector(p, 16)), shapeVector(p, 32)));
}

// Keeps the row [p, p + length) as the shape (its fields' places are already in SHAPE_FIELD_INFO).
// @ts-ignore: decorator
@inline function keepShape(p: usize, length: i32): void {
  const zeros = i8x16.splat(48);
  const tens = i8x16.splat(10);
  const iota = v128.load(IOTA);
  for (let k = 0; k < SHAPE_BYTES; k += 16) {
    const v = v128.load(p + k);
    const digit = i8x16.lt_u(i8x16.sub(v, zeros), tens);
    v128.store(SHAPE + k, v128.bitselect(zeros, v, digit));
    const past = i8x16.ge_u(iota, i8x16.splat(<i8>max(length - k, 0)));
    v128.store(SHAPE_LIMIT + k, v128.or(past, v128.and(digit, i8x16.splat(9))));
  }
  shapeLength = length;
}

// The number the 16 digit values in the lanes of d spell (first lane most significant, each 0-9): pairs with one
// 16-bit multiply (10·a + b = (a + 256·b)·2561 >> 8 while it fits 16 bits), fours with a multiply-add, eights
// with another after narrowing, then the two eights.
// @ts-ignore: decorator
@inline function simdDigits(d: v128): u64 {
  const pairs = i16x8.shr_u(i16x8.mul(d, i16x8.splat(2561)), 8);
  const fours = i32x4.dot_i16x8_s(pairs, i32x4.splat(0x00010064));
  const eights = i32x4.dot_i16x8_s(i16x8.narrow_i32x4_s(fours, fours), i32x4.splat(0x00012710));
  return <u64>i32x4.extract_lane(eights, 0) * 100000000 + <u64>i32x4.extract_lane(eights, 1);
}

// Pushes (i, r) on the upper hull of n vertices (xs, ys): drops the last vertex while it does not make a right
// turn. Returns the new count.
// @ts-ignore: decorator
@inline function pushUpper(xs: usize, ys: usize, n: i32, i: f64, r: f64): i32 {
  while (n >= 2) {
    const x0 = load<f64>(xs + ((n - 2) << 3));
    const y0 = load<f64>(ys + ((n - 2) << 3));
    if ((load<f64>(xs + ((n - 1) << 3)) - x0) * (r - y0) - (load<f64>(ys + ((n - 1) << 3)) - y0) * (i - x0) >= 0) n--;
    else break;
  }
  store<f64>(xs + (n << 3), i);
  store<f64>(ys + (n << 3), r);
  return n + 1;
}

// The same for the lower hull: drops the last vertex while it does not make a left turn.
// @ts-ignore: decorator
@inline function pushLower(xs: usize, ys: usize, n: i32, i: f64, r: f64): i32 {
  while (n >= 2) {
    const x0 = load<f64>(xs + ((n - 2) << 3));
    const y0 = load<f64>(ys + ((n - 2) << 3));
    if ((load<f64>(xs + ((n - 1) << 3)) - x0) * (r - y0) - (load<f64>(ys + ((n - 1) << 3)) - y0) * (i - x0) <= 0) n--;
    else break;
  }
  store<f64>(xs + (n << 3), i);
  store<f64>(ys + (n << 3), r);
  return n + 1;
}

// Rows of one shape read in a batch, column after column (see readShapeColumn); at most this many at a time so
// that the batch's bytes stay in the first-level cache while each column is read.
const BATCH_ROWS = 256;

/**
 * Reads field `col` of `k` rows of the shape from p (one every `length` bytes) into the doubles at `to`, with
 * everything about the field (its places, its power of ten, the column's factor) held in locals for the batch.
 * Returns how many rows it read before the first one it could not take this way (k when all): a row whose
 * exponent is out of the exact range, a possible sentinel, or a time out of range; the field-by-field reading
 * then takes that row or stops at it.
 */
function readShapeColumn(p: usize, length: i32, k: i32, col: i32, factor: f64, isTime: bool, to: usize, minSentinel: f64): i32 {
  const info = SHAPE_FIELD_INFO + (<usize>col << 3);
  // (−v)·f and v·(−f) are the same double (IEEE 754 rounding is symmetric), so the sign goes into the factor.
  const signedFactor = load<u8>(info, 6) != 0 ? -factor : factor;
  if (load<u8>(info, 5) == 0) {
    return isTime ? readPlainColumn(p, length, k, info, col, signedFactor, true, to, minSentinel)
      : readPlainColumn(p, length, k, info, col, signedFactor, false, to, minSentinel);
  }
  return isTime ? readExpColumn(p, length, k, info, col, signedFactor, true, to, minSentinel)
    : readExpColumn(p, length, k, info, col, signedFactor, false, to, minSentinel);
}

// Stores a batch row's value (its sign is in the factor) at `at`; false, storing nothing, for a row to leave to the
// field-by-field reading: a value that may be a sentinel, or a time out of range.
// @ts-ignore: decorator
@inline function storeValue(value: f64, signedFactor: f64, isTime: bool, minSentinel: f64, at: usize): bool {
  if (value >= minSentinel) {
    if (value != 0) return false;
  }
  const scaled = value * signedFactor;
  if (isTime) {
    if (!(abs(scaled) <= MAX_TIME_SECONDS)) return false;
  }
  store<f64>(at, scaled);
  return true;
}

// A field without an exponent: the power of ten is the fraction's, the same for every row.
// @ts-ignore: decorator
@inline function readPlainColumn(p: usize, length: i32, k: i32, info: usize, col: i32, signedFactor: f64, isTime: bool, to: usize, minSentinel: f64): i32 {
  const lanes = v128.load(SHAPE_DIGIT_LANES + (<usize>col << 4));
  const zeros = i8x16.splat(48);
  const divisor = load<f64>(POW10 + (<usize>load<u8>(info, 3) << 3));
  let q = p + <usize>load<u8>(info);
  for (let j = 0; j < k; j++) {
    const value = <f64><i64>simdDigits(i8x16.swizzle(i8x16.sub(v128.load(q), zeros), lanes)) / divisor;
    if (!storeValue(value, signedFactor, isTime, minSentinel, to + (<usize>j << 3))) return j;
    q += length;
  }
  return k;
}

// A field with an exponent of 1–4 digits, read from one 32-bit load shifted to the top lanes and summed as in
// eightDigits.
// @ts-ignore: decorator
@inline function readExpColumn(p: usize, length: i32, k: i32, info: usize, col: i32, signedFactor: f64, isTime: bool, to: usize, minSentinel: f64): i32 {
  const lanes = v128.load(SHAPE_DIGIT_LANES + (<usize>col << 4));
  const zeros = i8x16.splat(48);
  const fracDigits = <i32>load<u8>(info, 3);
  const shift = <u32>(4 - <i32>load<u8>(info, 5)) << 3;
  const eneg = load<u8>(info, 7) != 0;
  let q = p + <usize>load<u8>(info);
  let at = p + <usize>load<u8>(info, 4);
  for (let j = 0; j < k; j++) {
    const mant = simdDigits(i8x16.swizzle(i8x16.sub(v128.load(q), zeros), lanes));
    let x = (load<u32>(at) - 0x30303030) << shift;
    x = x * 10 + (x >> 8);
    const e = <i32>((((x & 0x00ff00ff) * 0x00640001) >> 16) & 0xffff);
    const exp10 = (eneg ? -e : e) - fracDigits;
    const fm = <f64><i64>mant;
    let value: f64;
    if (exp10 < 0) {
      if (exp10 < -22) return j;
      value = fm / load<f64>(POW10 + (<usize>(-exp10) << 3));
    } else {
      if (exp10 > 22) return j;
      value = fm * load<f64>(POW10 + (<usize>exp10 << 3));
    }
    if (!storeValue(value, signedFactor, isTime, minSentinel, to + (<usize>j << 3))) return j;
    q += length;
    at += length;
  }
  return k;
}

/**
 * Scans rows from `start` while they are plain numbers, up to `maxRows` rows or `end` (the window's end, just
 * after a line end). Returns the rows taken; stopAt() gives where it stopped and lastTimeAfter() the last time.
 * `lastTime` is NaN before a file's first row.
 */
export function scan(
  start: i32, end: i32, width: i32, delimiter: i32, decimal: i32, columns: i32, out: i32, stride: i32,
  maxRows: i32, lastTime: f64, minSentinel: f64,
  hull: i32, hullRoom: i32, upper: i32, lower: i32, firstRow: f64, t0: f64, dtHint: f64,
): i32 {
  // With `hull` (an address, else 0), the times are not written out but pushed on the convex hulls of their
  // deviation from an even grid, exactly as TimeGridHull.push (shared/import/time-grid-hull.ts) does with the same
  // IEEE operations in the same order: vertices (i, r) at hull (upper i), + hullRoom (upper r), + 2·hullRoom
  // (lower i), + 3·hullRoom (lower r), `upper` and `lower` of them in use; it stops before a row that could
  // overflow them (the caller then grows them in JS).
  const ui = hull;
  const ur = hull + (hullRoom << 3);
  const li = hull + (hullRoom << 4);
  const lr = hull + (hullRoom << 3) * 3;
  const delimiters = i8x16.splat(<i8>delimiter);
  const lineFeeds = i8x16.splat(10);
  const returns = i8x16.splat(13);
  const zeros = i8x16.splat(48);
  const tens = i8x16.splat(10);
  let p = start;
  let row = 0;
  // A shape is kept within one call only: the next may be for other columns or another delimiter.
  shapeLength = 0;
  // The time's column, -1 for none.
  let timeCol = -1;
  for (let col = 0; col < width; col++) if (load<i32>(columns + (width << 3) + (col << 2)) != 0) timeCol = col;
  // The row at p is to be read field by field (its shape matched but a field did not).
  let fieldByField = false;
  while (p < end && row < maxRows) {
    if (hull != 0 && (upper >= hullRoom || lower >= hullRoom)) break;
    const length = shapeLength;
    if (!fieldByField && length != 0 && p + length <= end && hasShape(p)) {
      // Laid out as the row before: a batch of the rows of this shape, each field's digits where the shape says
      // (see SHAPE_BYTES), read column after column.
      const most = min(BATCH_ROWS, maxRows - row);
      let k = 1;
      let next = p + length;
      while (k < most && next + length <= end && hasShape(next)) {
        k++;
        next += length;
      }
      const shaped = k;
      for (let col = 0; col < width && k > 0; col++) {
        k = readShapeColumn(p, length, k, col, load<f64>(columns + (col << 3)), col == timeCol, out + ((<usize>(col * stride + row)) << 3), minSentinel);
      }
      // The times, row by row: increasing, and on the hulls.
      let taken = k;
      let stop = false;
      if (timeCol >= 0) {
        const times = out + ((<usize>(timeCol * stride + row)) << 3);
        for (let j = 0; j < k; j++) {
          if (hull != 0 && (upper >= hullRoom || lower >= hullRoom)) { taken = j; stop = true; break; }
          const rowTime = load<f64>(times + (<usize>j << 3));
          if (lastTime == lastTime && !(rowTime > lastTime)) { taken = j; stop = true; break; }
          lastTime = rowTime;
          if (hull != 0) {
            const i = firstRow + <f64>(row + j);
            const r = rowTime - t0 - i * dtHint;
            upper = pushUpper(ui, ur, upper, i, r);
            lower = pushLower(li, lr, lower, i, r);
          }
        }
      }
      row += taken;
      p += <usize>(taken * length);
      if (stop) break;
      fieldByField = taken < shaped;
      continue;
    }
    fieldByField = false;
    let q = p;
    let col = 0;
    let rowTime: f64 = NaN;
    let taken = false;
    // Field by field; a row taken this way that is short enough becomes the shape.
    let shapeOk = width <= SHAPE_FIELDS && <u32>(delimiter - 48) >= 10;
    for (;;) {
      let neg = false;
      let mant: u64 = 0;
      let exp10: i32 = 0;
      let c: i32 = 0;
      // The common field, at most 15 bytes, read from one
      // 16-byte vector: where it ends (the first delimiter or line end) and where its digits are come from two
      // lane masks, so the next field's start does not wait for this one's digits to be read. Anything else takes
      // the byte-by-byte reading below, which also decides what the JS scanner is left.
      const v = v128.load(q);
      const ends = i8x16.bitmask(v128.or(v128.or(i8x16.eq(v, delimiters), i8x16.eq(v, lineFeeds)), i8x16.eq(v, returns)));
      let simple = false;
      if (ends != 0) {
        const length = <i32>ctz(ends);
        const digitLanes = ~i8x16.bitmask(i8x16.lt_u(i8x16.sub(v, zeros), tens)); // set where not a digit
        const sign = i8x16.extract_lane_u(v, 0) == 45 ? 1 : 0;
        const intDigits = <i32>ctz(digitLanes >> sign);
        let k = sign + intDigits;
        let fracDigits = 0;
        if (<i32>load<u8>(q + k) == decimal) {
          fracDigits = <i32>ctz(digitLanes >> (k + 1));
          k += 1 + fracDigits;
        }
        let e: i32 = 0;
        let eneg = false;
        let formOk = intDigits + fracDigits > 0;
        if (formOk && k < length) {
          const m = <i32>load<u8>(q + k);
          formOk = m == 101 || m == 69;
          k++;
          const s = <i32>load<u8>(q + k);
          if (s == 45) { eneg = true; k++; } else if (s == 43) { k++; }
          const expDigits = length - k;
          formOk = formOk && expDigits >= 1 && expDigits <= 4 && <i32>ctz(digitLanes >> k) >= expDigits;
          if (formOk) for (let i = k; i < length; i++) e = e * 10 + (<i32>load<u8>(q + i) - 48);
        }
        if (formOk) {
          simple = true;
          neg = sign != 0;
          if (intDigits != 0) mant = digitRun(q + sign, intDigits);
          if (fracDigits != 0) mant = mant * ipow10(fracDigits) + digitRun(q + sign + intDigits + 1, fracDigits);
          exp10 = (eneg ? -e : e) - fracDigits;
          if (shapeOk) {
            const info = SHAPE_FIELD_INFO + (<usize>col << 3);
            const at = q - p; // below SHAPE_BYTES while the row may become the shape; checked at its end
            store<u8>(info, <u8>(at + sign));
            store<u8>(info, <u8>intDigits, 1);
            store<u8>(info, <u8>(at + sign + intDigits + 1), 2);
            store<u8>(info, <u8>fracDigits, 3);
            store<u8>(info, <u8>(at + k), 4); // k: past the exponent's mark and sign, else the field's end
            store<u8>(info, <u8>(length - k), 5);
            store<u8>(info, <u8>sign, 6);
            store<u8>(info, <u8>(eneg ? 1 : 0), 7);
            // Output lane j takes digit i = j − (16 − n) of the n, from lane i of the integer part or i + 1 (past the
            // point) of the fraction; lanes before the digits get 255, which swizzle turns into 0.
            const iota = v128.load(IOTA);
            const n = intDigits + fracDigits;
            const i = i8x16.sub(iota, i8x16.splat(<i8>(16 - n)));
            const from = i8x16.sub(i, i8x16.ge_s(i, i8x16.splat(<i8>intDigits)));
            v128.store(SHAPE_DIGIT_LANES + (<usize>col << 4), v128.or(from, i8x16.lt_u(iota, i8x16.splat(<i8>(16 - n)))));
          }
          q += length;
          c = <i32>load<u8>(q);
        }
      }
      if (!simple) {
        shapeOk = false;
        // Byte by byte (eight digits at a time where eight are there): longer fields, and every form to refuse.
        if (load<u8>(q) == 45) { neg = true; q++; }
        // Integer part (digitsFrom: eight digits at a time).
        const intStart = q;
        q = digitsFrom(q, mant);
        mant = runMant;
        let digits = q - intStart;
        c = <i32>load<u8>(q);
        if (c == decimal) {
          const fracStart = ++q;
          q = digitsFrom(q, mant);
          mant = runMant;
          c = <i32>load<u8>(q);
          exp10 = fracStart - q;
          digits -= exp10;
        }
        // More than 19 digits could have wrapped the 64-bit mantissa: left to the JS scanner (which reads them).
        if (digits == 0 || digits > 19) break;
        if (c == 101 || c == 69) {
          c = <i32>load<u8>(++q);
          let eneg = false;
          if (c == 45) { eneg = true; c = <i32>load<u8>(++q); } else if (c == 43) { c = <i32>load<u8>(++q); }
          let e: i32 = 0;
          const expStart = q;
          while (<u32>(c - 48) < 10) { e = e * 10 + (c - 48); c = <i32>load<u8>(++q); }
          const expDigits = q - expStart;
          if (expDigits == 0 || expDigits > 4) break;
          exp10 += eneg ? -e : e;
        }
      }
      if (c != delimiter && c != 10 && c != 13) break;
      const value = exactValue(neg, mant, exp10);
      if (value != value) break;
      // A value that may be a numeric sentinel: the JS scanner decides.
      if (value != 0 && abs(value) >= minSentinel) break;
      const param = columns + (col << 3);
      const scaled = value * load<f64>(param);
      if (load<i32>(columns + (width << 3) + (col << 2)) != 0) {
        if (!(abs(scaled) <= MAX_TIME_SECONDS)) break;
        rowTime = scaled;
      }
      store<f64>(out + ((col * stride + row) << 3), scaled);
      if (c == delimiter) {
        if (++col == width) break;
        q++;
        continue;
      }
      taken = col + 1 == width;
      break;
    }
    if (!taken) break;
    if (rowTime == rowTime) {
      if (lastTime == lastTime && !(rowTime > lastTime)) break;
      lastTime = rowTime;
      if (hull != 0) {
        const i = firstRow + <f64>row;
        const r = rowTime - t0 - i * dtHint;
        upper = pushUpper(ui, ur, upper, i, r);
        lower = pushLower(li, lr, lower, i, r);
      }
    }
    row++;
    if (q < end && load<u8>(q) == 13) q++;
    if (q < end && load<u8>(q) == 10) q++;
    // Only a row ended by an LF: after a lone CR the next row might begin with an LF that would be taken with it.
    if (shapeOk && q - p <= SHAPE_BYTES && load<u8>(q - 1) == 10) keepShape(p, q - p);
    else shapeLength = 0;
    p = q;
  }
  stopOffset = p;
  timeAfter = lastTime;
  upperCount = upper;
  lowerCount = lower;
  return row;
}
