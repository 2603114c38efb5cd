// Counter-based random streams. A ray's stream depends only on (seed, stream id, global ray index): the three are
// hashed (murmur3 finaliser, a bijection on 32-bit words) into the 128-bit state of sfc32 (Chris Doty-Humphrey's
// "small fast counting" generator), so any chunking of the ray range, on any number of threads, replays the same
// numbers. Pure 32-bit integer arithmetic (Math.imul, >>> 0); no BigInt, no unseeded random source. Ray indices up to 2^53
// are split into low and high words.

/** State of one stream: four 32-bit words, reused across rays (no allocation per ray). */
export type RngState = Int32Array

export function createRngState(): RngState {
  return new Int32Array(4)
}

/** murmur3 fmix32: avalanche a 32-bit word (bijective). */
export function mix32(h: number): number {
  h ^= h >>> 16
  h = Math.imul(h, 0x85ebca6b)
  h ^= h >>> 13
  h = Math.imul(h, 0xc2b2ae35)
  h ^= h >>> 16
  return h >>> 0
}

/** Seeds `st` for ray `rayIndex` of stream `streamId` under `seed`. */
export function seedRay(st: RngState, seed: number, streamId: number, rayIndex: number): void {
  const lo = rayIndex >>> 0
  const hi = Math.floor(rayIndex / 4294967296) >>> 0
  const s = mix32((seed >>> 0) ^ 0x9e3779b9)
  const k = mix32(Math.imul(streamId + 1, 0x632be5ab) ^ s)
  st[0] = mix32(lo ^ k)
  st[1] = mix32(Math.imul(hi, 0x2545f491) ^ mix32(lo + 0x6a09e667 ^ s))
  st[2] = mix32(k + Math.imul(lo, 0x9e3779b1) ^ hi)
  st[3] = 1 // sfc32 counter word
  // Discard a few outputs so the first numbers are well mixed (sfc32 practice: ~12; the hashed seed needs fewer).
  for (let i = 0; i < 6; i++) nextUint32(st)
}

/** Next 32-bit unsigned integer of sfc32. */
export function nextUint32(st: RngState): number {
  const a = st[0]!, b = st[1]!, c = st[2]!, d = st[3]!
  const t = (((a + b) | 0) + d) | 0
  st[3] = (d + 1) | 0
  st[0] = b ^ (b >>> 9)
  st[1] = (c + (c << 3)) | 0
  const cr = (c << 21) | (c >>> 11)
  st[2] = (cr + t) | 0
  return t >>> 0
}

/** Uniform number in the open interval (0, 1): (k + 0.5)/2^32, never 0 (safe for −ln u) and never 1. */
export function nextUniform(st: RngState): number {
  return (nextUint32(st) + 0.5) * 2.3283064365386963e-10
}

/** Fills `out` with the next out.length uniforms of the stream (the same numbers nextUniform would return). */
export function fillUniforms(st: RngState, out: Float64Array): void {
  let a = st[0]!, b = st[1]!, c = st[2]!, d = st[3]!
  for (let i = 0; i < out.length; i++) {
    const t = (((a + b) | 0) + d) | 0
    d = (d + 1) | 0
    a = b ^ (b >>> 9)
    b = (c + (c << 3)) | 0
    c = (((c << 21) | (c >>> 11)) + t) | 0
    out[i] = ((t >>> 0) + 0.5) * 2.3283064365386963e-10
  }
  st[0] = a; st[1] = b; st[2] = c; st[3] = d
}
