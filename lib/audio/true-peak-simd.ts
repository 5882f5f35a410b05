/**
 * The 4x true-peak kernel of ./true-peak for two channels at once, as a small
 * WebAssembly module using 128-bit SIMD. Two functions:
 *
 *  - `peak64`: each f64x2 lane carries one channel and performs exactly the
 *    sums of the JavaScript kernel (`twoStageInterpolator().peak` in
 *    ./true-peak), in the same order, in IEEE double precision without fused
 *    multiply-add — the same result to the last bit, about twice as many
 *    samples per instruction and no JavaScript bounds checks. Used when the
 *    samples come as Float64Array.
 *  - `peak32`: for Float32Array samples (what decodeWav returns), f32x4 lanes
 *    carry (left, right) at two neighbouring positions, so each instruction
 *    does four outputs' work. The samples are float32 already, so only the
 *    coefficients (rounded to float32, relative error ≤ 2^-24) and the sums
 *    (26 multiply-adds, each rounding by ≤ 2^-24) differ from the double
 *    path. With |x| ≤ 1 and sum |h| ≈ 2.1 the standard bound for a sum of n
 *    products, |error| ≤ n·u·sum|h_m x_m| (Higham, Accuracy and Stability of
 *    Numerical Algorithms, 2nd ed., §3.1; recalled from memory), gives about
 *    30 × 6e-8 × 2.1 ≈ 4e-6 at full scale, i.e. under 0.0001 dB — four
 *    orders below the ±0.2 dB that EBU Tech 3341 allows for true peak.
 *
 * The module is assembled here from its instructions rather than shipped as
 * an opaque binary, so it can be read and reviewed. Opcodes: WebAssembly Core
 * Specification 2.0, §5.4 (binary instructions; SIMD opcodes are prefixed
 * with 0xFD). If the runtime cannot compile it (no SIMD), `loadSimdKernel`
 * returns null and the JavaScript kernel is used.
 *
 * Memory layout (one or more 64 KiB pages):
 *   [0, 208)      13 coefficients as f64, each splatted to both lanes (a0…a7, c0…c4)
 *   [256, 288)    peak64 results: lane-wise maximum, then lane-wise minimum
 *   [384, 416)    peak32 results: lane-wise maximum, then lane-wise minimum
 *   [512, 720)    the 13 coefficients as f32, splatted to four lanes
 *   [1024, …)     the block with context: frames of (left, right), as f64
 *                 for peak64 or as f32 for peak32
 */

export const SIMD_INPUT_BASE = 1024;
const RESULT64 = 256;
const RESULT32 = 384;
const COEF32 = 512;
const PAGE = 65_536;

// ── a tiny assembler ───────────────────────────────────────────────────────
function uleb(n: number): number[] {
  const out: number[] = [];
  do {
    let byte = n & 0x7f;
    n >>>= 7;
    if (n !== 0) byte |= 0x80;
    out.push(byte);
  } while (n !== 0);
  return out;
}

function sleb(n: number): number[] {
  const out: number[] = [];
  for (;;) {
    const byte = n & 0x7f;
    n >>= 7;
    if ((n === 0 && (byte & 0x40) === 0) || (n === -1 && (byte & 0x40) !== 0)) {
      out.push(byte);
      return out;
    }
    out.push(byte | 0x80);
  }
}

const vec = (items: number[][]): number[] => [...uleb(items.length), ...items.flat()];
const section = (id: number, body: number[]): number[] => [id, ...uleb(body.length), ...body];
const utf8 = (s: string): number[] => [...uleb(s.length), ...Array.from(s, (ch) => ch.charCodeAt(0))];

const I32 = 0x7f;
const V128 = 0x7b;
const op = {
  block: [0x02, 0x40],
  loop: [0x03, 0x40],
  end: [0x0b],
  br: (depth: number) => [0x0c, ...uleb(depth)],
  brIf: (depth: number) => [0x0d, ...uleb(depth)],
  get: (i: number) => [0x20, ...uleb(i)],
  set: (i: number) => [0x21, ...uleb(i)],
  i32: (v: number) => [0x41, ...sleb(v)],
  i32Add: [0x6a],
  i32GeU: [0x4f],
  // v128.load / v128.store with alignment 2^4 and a constant byte offset.
  load: (offset: number) => [0xfd, ...uleb(0x00), 4, ...uleb(offset)],
  store: (offset: number) => [0xfd, ...uleb(0x0b), 4, ...uleb(offset)],
  i32Sub: [0x6b],
  i32LtU: [0x49],
  if: [0x04, 0x40],
  shuffle: (lanes: number[]) => [0xfd, ...uleb(0x0d), ...lanes], // i8x16.shuffle, 16 byte indices
};

interface Lanes {
  add: number[];
  mul: number[];
  min: number[];
  max: number[];
  /** Bytes per frame of (left, right). */
  frame: number;
}

const F64: Lanes = {
  add: [0xfd, ...uleb(0xf0)], // f64x2.add
  mul: [0xfd, ...uleb(0xf2)], // f64x2.mul
  min: [0xfd, ...uleb(0xf4)], // f64x2.min
  max: [0xfd, ...uleb(0xf5)], // f64x2.max
  frame: 16,
};

const F32: Lanes = {
  add: [0xfd, ...uleb(0xe4)], // f32x4.add
  mul: [0xfd, ...uleb(0xe6)], // f32x4.mul
  min: [0xfd, ...uleb(0xe8)], // f32x4.min
  max: [0xfd, ...uleb(0xe9)], // f32x4.max
  frame: 8,
};

/** Locals: parameter 0 = count (i32); then i32 i, r; then v128 values. */
const L = {
  count: 0,
  i: 1,
  r: 2,
  coef: (k: number) => 3 + k, // a0…a7 = 0…7, c0…c4 = 8…12
  // peak64: H(i-2), H(i-1), H(i), H(i+1), H(i+2). peak32: V(i-2), V(i), V(i+2) and two shifted pairs.
  hm2: 16,
  hm1: 17,
  h0: 18,
  hp1: 19,
  hp2: 20,
  x0: 21,
  hi: 22,
  lo: 23,
  t: 24,
} as const;
const V128_LOCALS = L.t - 3 + 1;

/**
 * H: the stage-1 half-sample value whose 16 inputs are the frames starting at
 * `ptr + offset`: a0 (X0 + X15) + a1 (X1 + X14) + … + a7 (X7 + X8), summed
 * left to right (the order of the JavaScript kernel).
 */
function half(lanes: Lanes, ptr: number, offset: number): number[] {
  const code: number[] = [];
  for (let m = 0; m < 8; m++) {
    code.push(...op.get(L.coef(m)), ...op.get(ptr), ...op.load(offset + lanes.frame * m), ...op.get(ptr), ...op.load(offset + lanes.frame * (15 - m)));
    code.push(...lanes.add, ...lanes.mul);
    if (m > 0) code.push(...lanes.add);
  }
  return code;
}

type Term = { local: number } | { x: number };

/** c0 (p0 + q0) + c1 (p1 + q1) + … with each operand a local or X(c + d) at r + frame (d + 5). */
function quarter(lanes: Lanes, pairs: Array<[Term, Term]>): number[] {
  const code: number[] = [];
  const operand = (t: Term) => ("local" in t ? op.get(t.local) : [...op.get(L.r), ...op.load(lanes.frame * (t.x + 5))]);
  pairs.forEach(([p, q], k) => {
    code.push(...op.get(L.coef(8 + k)), ...operand(p), ...operand(q), ...lanes.add, ...lanes.mul);
    if (k > 0) code.push(...lanes.add);
  });
  return code;
}

/** hi = max(hi, value); lo = min(lo, value); `value` is code leaving one vector. */
function track(lanes: Lanes, value: number[]): number[] {
  return [
    ...value, ...op.set(L.t),
    ...op.get(L.hi), ...op.get(L.t), ...lanes.max, ...op.set(L.hi),
    ...op.get(L.lo), ...op.get(L.t), ...lanes.min, ...op.set(L.lo),
  ];
}

const X = (d: number): Term => ({ x: d });
const V = (local: number): Term => ({ local });

function loadCoefficients(base: number): number[] {
  const code: number[] = [];
  for (let k = 0; k < 13; k++) code.push(...op.i32(0), ...op.load(base + 16 * k), ...op.set(L.coef(k)));
  return code;
}

/** peak64(count): one output position per iteration, lanes = (left, right) as f64. */
function peak64Body(margin: number): number[] {
  const f = F64;
  const body: number[] = [...loadCoefficients(0)];
  // Prologue: H at positions -2 … 1, whose inputs start 7 frames earlier.
  const start = (j: number) => SIMD_INPUT_BASE + f.frame * (margin + j - 7);
  body.push(...op.i32(0), ...op.set(L.r));
  body.push(...half(f, L.r, start(-2)), ...op.set(L.hm2));
  body.push(...half(f, L.r, start(-1)), ...op.set(L.hm1));
  body.push(...half(f, L.r, start(0)), ...op.set(L.h0));
  body.push(...half(f, L.r, start(1)), ...op.set(L.hp1));
  // r points at X(i - 5), so X(i + d) sits at r + frame (d + 5).
  body.push(...op.i32(SIMD_INPUT_BASE + f.frame * (margin - 5)), ...op.set(L.r));
  body.push(...op.i32(0), ...op.set(L.i));
  body.push(...op.get(L.h0), ...op.set(L.hi), ...op.get(L.h0), ...op.set(L.lo));
  const loop: number[] = [
    ...op.get(L.i), ...op.get(L.count), ...op.i32GeU, ...op.brIf(1),
    ...half(f, L.r, 0), ...op.set(L.hp2),
    ...op.get(L.r), ...op.load(f.frame * 5), ...op.set(L.x0),
    ...track(f, op.get(L.x0)),
    // q1 = c0 (X(i-2) + H(i+2)) + c1 (H(i-2) + X(i+2)) + c2 (X(i-1) + H(i+1)) + c3 (H(i-1) + X(i+1)) + c4 (X(i) + H(i))
    ...track(f, quarter(f, [[X(-2), V(L.hp2)], [V(L.hm2), X(2)], [X(-1), V(L.hp1)], [V(L.hm1), X(1)], [V(L.x0), V(L.h0)]])),
    ...track(f, op.get(L.h0)),
    // q3 = c0 (H(i-2) + X(i+3)) + c1 (X(i-1) + H(i+2)) + c2 (H(i-1) + X(i+2)) + c3 (X(i) + H(i+1)) + c4 (H(i) + X(i+1))
    ...track(f, quarter(f, [[V(L.hm2), X(3)], [X(-1), V(L.hp2)], [V(L.hm1), X(2)], [V(L.x0), V(L.hp1)], [V(L.h0), X(1)]])),
    ...op.get(L.hm1), ...op.set(L.hm2),
    ...op.get(L.h0), ...op.set(L.hm1),
    ...op.get(L.hp1), ...op.set(L.h0),
    ...op.get(L.hp2), ...op.set(L.hp1),
    ...op.get(L.i), ...op.i32(1), ...op.i32Add, ...op.set(L.i),
    ...op.get(L.r), ...op.i32(f.frame), ...op.i32Add, ...op.set(L.r),
    ...op.br(0),
  ];
  body.push(...op.block, ...op.loop, ...loop, ...op.end, ...op.end);
  body.push(...op.i32(0), ...op.get(L.hi), ...op.store(RESULT64));
  body.push(...op.i32(0), ...op.get(L.lo), ...op.store(RESULT64 + 16));
  body.push(...op.end);
  return body;
}

/** Bytes 8…15 of `a` then bytes 0…7 of `b`: the upper frame of one pair and the lower frame of the next. */
const STRADDLE = [8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 18, 19, 20, 21, 22, 23];
/** Bytes 0…7 twice: the lower position in both halves (an odd last position). */
const LOWER_TWICE = [0, 1, 2, 3, 4, 5, 6, 7, 0, 1, 2, 3, 4, 5, 6, 7];

/**
 * peak32(count): two output positions (i, i+1) per iteration, lanes =
 * (left i, right i, left i+1, right i+1) as f32. V(j) = (H(j), H(j+1)) comes
 * out of the same 16 loads as H(j), because a load at frame k holds frames
 * k and k+1. Locals: hm2 = V(i-2), h0 = V(i), hp2 = V(i+2); hm1 = (H(i-1),
 * H(i)) and hp1 = (H(i+1), H(i+2)) are shuffled from them.
 */
function peak32Body(margin: number): number[] {
  const f = F32;
  const body: number[] = [...loadCoefficients(COEF32)];
  const start = (j: number) => SIMD_INPUT_BASE + f.frame * (margin + j - 7);
  body.push(...op.i32(0), ...op.set(L.r));
  body.push(...half(f, L.r, start(-2)), ...op.set(L.hm2));
  body.push(...half(f, L.r, start(0)), ...op.set(L.h0));
  body.push(...op.i32(SIMD_INPUT_BASE + f.frame * (margin - 5)), ...op.set(L.r));
  body.push(...op.i32(0), ...op.set(L.i));
  body.push(...op.get(L.h0), ...op.set(L.hi), ...op.get(L.h0), ...op.set(L.lo));
  const step = (lastOdd: boolean): number[] => {
    // An odd last position: copy its lanes over the position after it, so that one is never counted.
    const only = (code: number[]) => (lastOdd ? [...code, ...op.set(L.t), ...op.get(L.t), ...op.get(L.t), ...op.shuffle(LOWER_TWICE)] : code);
    return [
      ...half(f, L.r, 0), ...op.set(L.hp2),
      ...op.get(L.hm2), ...op.get(L.h0), ...op.shuffle(STRADDLE), ...op.set(L.hm1),
      ...op.get(L.h0), ...op.get(L.hp2), ...op.shuffle(STRADDLE), ...op.set(L.hp1),
      ...op.get(L.r), ...op.load(f.frame * 5), ...op.set(L.x0),
      ...track(f, only(op.get(L.x0))),
      ...track(f, only(quarter(f, [[X(-2), V(L.hp2)], [V(L.hm2), X(2)], [X(-1), V(L.hp1)], [V(L.hm1), X(1)], [V(L.x0), V(L.h0)]]))),
      ...track(f, only(op.get(L.h0))),
      ...track(f, only(quarter(f, [[V(L.hm2), X(3)], [X(-1), V(L.hp2)], [V(L.hm1), X(2)], [V(L.x0), V(L.hp1)], [V(L.h0), X(1)]]))),
    ];
  };
  const loop: number[] = [
    // Stop when fewer than two positions are left.
    ...op.get(L.i), ...op.i32(1), ...op.i32Add, ...op.get(L.count), ...op.i32GeU, ...op.brIf(1),
    ...step(false),
    ...op.get(L.h0), ...op.set(L.hm2),
    ...op.get(L.hp2), ...op.set(L.h0),
    ...op.get(L.i), ...op.i32(2), ...op.i32Add, ...op.set(L.i),
    ...op.get(L.r), ...op.i32(2 * f.frame), ...op.i32Add, ...op.set(L.r),
    ...op.br(0),
  ];
  body.push(...op.block, ...op.loop, ...loop, ...op.end, ...op.end);
  body.push(...op.get(L.i), ...op.get(L.count), ...op.i32LtU, ...op.if, ...step(true), ...op.end);
  body.push(...op.i32(0), ...op.get(L.hi), ...op.store(RESULT32));
  body.push(...op.i32(0), ...op.get(L.lo), ...op.store(RESULT32 + 16));
  body.push(...op.end);
  return body;
}

/** The module: `peak64(count)` and `peak32(count)` over positions 0 … count - 1 of the block. */
export function assembleTruePeakModule(margin: number): Uint8Array<ArrayBuffer> {
  const locals = vec([
    [...uleb(2), I32],
    [...uleb(V128_LOCALS), V128],
  ]);
  const code = (body: number[]) => {
    const func = [...locals, ...body];
    return [...uleb(func.length), ...func];
  };
  const bytes = [
    ...[0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00],
    ...section(1, vec([[0x60, ...vec([[I32]]), ...vec([])]])), // type 0: (i32) -> ()
    ...section(3, vec([uleb(0), uleb(0)])), // functions 0 and 1 have type 0
    ...section(5, vec([[0x00, ...uleb(1)]])), // one memory, min 1 page
    ...section(7, vec([
      [...utf8("peak64"), 0x00, ...uleb(0)],
      [...utf8("peak32"), 0x00, ...uleb(1)],
      [...utf8("memory"), 0x02, ...uleb(0)],
    ])),
    ...section(10, vec([code(peak64Body(margin)), code(peak32Body(margin))])),
  ];
  return Uint8Array.from(bytes);
}

export interface SimdKernel {
  readonly capacityFrames: number;
  /** Frames of (left, right) as f64 for `peak64`, starting at SIMD_INPUT_BASE. */
  readonly frames64: Float64Array;
  /** The same memory as f32 frames for `peak32`. */
  readonly frames32: Float32Array;
  /** Peaks (largest |value|) of both channels over positions 0 … count - 1; double precision. */
  readonly peak64: (count: number) => [number, number];
  /** The same from float32 frames, in float32 arithmetic (see the header for its error bound). */
  readonly peak32: (count: number) => [number, number];
}

/**
 * Compiles the kernels for these stage coefficients (a0…a7 of the 16-tap and
 * c0…c4 of the 10-tap half-sample filter), or returns null when the runtime
 * has no WebAssembly SIMD.
 */
export function loadSimdKernel(coefficients: Float64Array, margin: number, capacityFrames: number): SimdKernel | null {
  if (coefficients.length !== 13) throw new RangeError("expected 13 coefficients");
  if (typeof WebAssembly !== "object") return null;
  let instance: WebAssembly.Instance;
  try {
    const module = new WebAssembly.Module(assembleTruePeakModule(margin));
    instance = new WebAssembly.Instance(module, {});
  } catch {
    return null;
  }
  const memory = instance.exports.memory as WebAssembly.Memory;
  const needed = SIMD_INPUT_BASE + capacityFrames * 16;
  if (needed > memory.buffer.byteLength) memory.grow(Math.ceil((needed - memory.buffer.byteLength) / PAGE));
  const f64 = new Float64Array(memory.buffer, 0, COEF32 / 8);
  const f32 = new Float32Array(memory.buffer, COEF32, 13 * 4);
  for (let k = 0; k < 13; k++) {
    f64[2 * k] = coefficients[k]!;
    f64[2 * k + 1] = coefficients[k]!;
    for (let lane = 0; lane < 4; lane++) f32[4 * k + lane] = coefficients[k]!;
  }
  const run64 = instance.exports.peak64 as (count: number) => void;
  const run32 = instance.exports.peak32 as (count: number) => void;
  const r64 = new Float64Array(memory.buffer, RESULT64, 4);
  const r32 = new Float32Array(memory.buffer, RESULT32, 8);
  return {
    capacityFrames,
    frames64: new Float64Array(memory.buffer, SIMD_INPUT_BASE, capacityFrames * 2),
    frames32: new Float32Array(memory.buffer, SIMD_INPUT_BASE, capacityFrames * 2),
    peak64: (count: number) => {
      run64(count);
      const hiL = r64[0]!, hiR = r64[1]!, loL = r64[2]!, loR = r64[3]!;
      return [hiL > -loL ? hiL : -loL, hiR > -loR ? hiR : -loR];
    },
    peak32: (count: number) => {
      run32(count);
      const left = Math.max(r32[0]!, r32[2]!, -r32[4]!, -r32[6]!);
      const right = Math.max(r32[1]!, r32[3]!, -r32[5]!, -r32[7]!);
      return [left, right];
    },
  };
}
