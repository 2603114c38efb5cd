// The planar companion (the same stack without lenses) computed exactly instead of traced. In a flat stack every
// interface is normal to z, so the invariant u = n·sinθ of a ray is the same in the emitter, the substrate and air
// until a diffuse reflection gives it a new one: for one u a ray's life is a Markov chain over four states
// (emitter going down/up, substrate going up/down) with the same rules as steps.ts — reflector absorbs 1 − R,
// re-emits diffusely R·d, mirrors R(1 − d); the emitter/substrate face reflects R1 (Fresnel, only when the indices
// differ) or totally (u ≥ n_s: waveguided); the substrate absorbs 1 − A per pass, A = exp(−α t/cosθ_s)
// (Beer–Lambert); the top face transmits T2 into air at θ_air = asin u, reflects R2, or totally (u ≥ 1: trapped
// with a specular reflector, else back down). Fresnel power coefficients: Hecht, Optics, ch. 4. The chain is summed
// in closed form (geometric series of the two loops: emitter ↔ reflector and substrate round trip); a diffuse
// re-emission restarts the ray from a Lambertian distribution independent of where it came from, so the recycling
// is a renewal: total = direct + D·F/(1 − G), G the diffuse share of a Lambertian restart (the linear system over
// angle bins collapses to one scalar equation because the re-emitted distribution is fixed).
// "polarized" Fresnel: a ray's field keeps its s and p parts at flat faces (a metal mirror flips signs only), and
// reflecting with |rs|²|Es|² + |rp|²|Ep|² then renormalising is Bayes' rule for "the ray is s with probability
// |Es|²", so every outcome probability is the mean of the pure-s and pure-p chains (random linear launch and
// diffuse re-emission: E|Es|² = ½). "averaged": R = (Rs + Rp)/2; "none": no Fresnel reflection, TIR only.
// The event limit (maxEvents, one event per step) is honoured: a z-transform bound P(N > M) ≤ E[z^N]·z^−M decides
// whether the truncation is below 1e-15; when it is not, the chain is stepped event by event for exactly M steps
// (with a diffuse reflector only within a cost budget: beyond it the truncation is neglected, see flatAt).
// Quadrature: in u ∈ [0, 1] (light reaching air) Gauss–Legendre in θ_air within each 1° output bin (the integrand
// is analytic there, cosθ_air included), split at the steps of a tabulated profile's launch density; in
// u ∈ [1, min(n_e, n_s)] in the angle of the medium whose index ends the range (no square-root endpoint); beyond
// n_s a ray is waveguided whatever its u (exact lump). A spectrum: the same per wavelength cell of the packed grid
// (indices at the cell's middle), weighted by its share; the smooth wavelength dependence is evaluated on every 16th
// grid node and interpolated (cubic) to the cells. Units: µm, 1/µm, radians; outputs per launched ray.
import type { Losses, TraceResult } from '../types/result'
import type { Scenario } from '../types/scenario'
import {
  FRESNEL_NONE, FRESNEL_POLARIZED, packScene, PROFILE_ISOTROPIC, PROFILE_LAMBERTIAN, S_ABSORPTION_PER_UM, S_DIFFUSE_FRACTION,
  S_FRESNEL, S_MAX_EVENTS, S_N_EMITTER, S_N_SUBSTRATE, S_PROFILE, S_REFLECTANCE, S_SOURCE, S_SPECTRAL_OFFSET, S_TABLE, S_THICKNESS_UM,
  SOURCE_EXTENDED, type PackedScene,
} from './scene'
import { PROFILE_GRID } from './sampling'
import { SP_AS, SP_CDF, SP_NE, SP_NS, SPECTRAL_GRID, spectralSlot } from './spectral'
import { THETA_BINS } from './tally'

/** The planar block of a result, computed by quadrature (σ = 0: no sampling). */
export type FlatCompanion = TraceResult['planar'] & { method: 'quadrature' }

/**
 * Whether the flat companion of this scenario is computed by quadrature. A finite pixel (disc or rectangle) needs
 * exit positions for its footprint figures, so it keeps the traced companion. A thin-film source (emitter.thinFilm)
 * has its own exact flat split (shared/optics/thinfilm/flat.ts): it is dispatched there, not here.
 */
export function flatQuadratureApplies(sc: Scenario): boolean {
  // A thin-film stack has its own exact flat formula (thinfilm/flat.ts, applied in summarize); either way the
  // companion of an extended source costs no rays. A finite pixel's footprint tally needs traced companion rays.
  // A finite panel (edges, a detector's spot) is not the infinite flat stack the quadrature sums: traced.
  return sc.emitter.source.shape === 'extended' && sc.panel === undefined
}

const DEG = Math.PI / 180
/** Gauss–Legendre 5 points on [−1, 1] (Abramowitz & Stegun, Table 25.4). */
const GL5_X = [-0.906179845938664, -0.5384693101056831, 0, 0.5384693101056831, 0.906179845938664]
const GL5_W = [0.2369268850561891, 0.47862867049936647, 0.5688888888888889, 0.47862867049936647, 0.2369268850561891]
/** Panels over u ∈ [1, min(n_e, n_s)] (the substrate-mode range; 5 nodes each) before splitting at profile steps. */
const SUBSTRATE_PANELS = 24
/** Spectral grid nodes per wavelength evaluation (SPECTRAL_GRID / 16 + 1 = 65 evaluations over the spectrum's span). */
const SPECTRAL_STRIDE = 16
/** Node-steps (events × nodes × channels) the exact event stepping with a diffuse reflector may cost (~50 ms). */
const STEPPING_BUDGET = 2e7
/** Truncation by maxEvents below this (absolute, per launched ray) is treated as none. */
const TRUNCATION_TOLERANCE = 1e-15

// Outcome slots (per launched ray): extracted per 1° bin, then the losses.
const O_REFLECTOR = THETA_BINS
const O_SUBSTRATE = THETA_BINS + 1
const O_WAVEGUIDED = THETA_BINS + 2
const O_TRAPPED = THETA_BINS + 3
const O_UNRESOLVED = THETA_BINS + 4
const O_LENGTH = THETA_BINS + 5

/** The launch distribution over the emission cosine μ (signed: μ < 0 goes down to the reflector first). */
interface Launch {
  profile: number
  /** Tabulated profile: cdf[0..K], μ edges[0..K] (decreasing), from the packed scene (exactly what the tracer samples). */
  cdf?: Float64Array
  mu?: Float64Array
}

function launchOf(scene: PackedScene): Launch {
  const profile = scene[S_PROFILE]!
  if (profile === PROFILE_ISOTROPIC || profile === PROFILE_LAMBERTIAN) return { profile }
  const K = PROFILE_GRID
  return { profile, cdf: scene.subarray(S_TABLE, S_TABLE + K + 1), mu: scene.subarray(S_TABLE + K + 1, S_TABLE + 2 * K + 2) }
}

/** Launch probability density per unit μ at signed μ (piecewise constant for a table, as sampleTabulated draws it). */
function launchDensity(l: Launch, mu: number): number {
  if (l.profile === PROFILE_ISOTROPIC) return 0.5
  if (l.profile === PROFILE_LAMBERTIAN) return mu > 0 ? 2 * mu : 0
  const m = l.mu!, c = l.cdf!, K = PROFILE_GRID
  if (mu > m[0]! || mu < m[K]!) return 0
  let lo = 0, hi = K // slice i spans μ from m[i] down to m[i+1]
  while (hi - lo > 1) { const mid = (lo + hi) >> 1; if (m[mid]! >= mu) lo = mid; else hi = mid }
  const dm = m[lo]! - m[lo + 1]!
  return dm > 0 ? (c[lo + 1]! - c[lo]!) / dm : 0
}

/** Launch probability of μ ∈ [a, b] (signed, a < b). */
function launchMass(l: Launch, a: number, b: number): number {
  if (l.profile === PROFILE_ISOTROPIC) return 0.5 * (b - a)
  if (l.profile === PROFILE_LAMBERTIAN) { const lo = Math.max(0, a), hi = Math.max(0, b); return hi * hi - lo * lo }
  const m = l.mu!, c = l.cdf!, K = PROFILE_GRID
  let s = 0
  for (let i = 0; i < K; i++) {
    const hi = Math.min(b, m[i]!), lo = Math.max(a, m[i + 1]!)
    if (hi > lo) s += ((c[i + 1]! - c[i]!) * (hi - lo)) / (m[i]! - m[i + 1]!)
  }
  return s
}

/** The stack at one wavelength. */
interface Optics {
  nE: number; nS: number; alphaPerUm: number; tUm: number
  R: number; d: number
  fresnel: number
  maxEvents: number
}

/** Quadrature nodes at one wavelength: invariant u, launch masses up/down, Lambertian re-emission mass, exit bin. */
interface Nodes {
  count: number
  u: Float64Array; up: Float64Array; down: Float64Array; lamb: Float64Array; bin: Int32Array
  /** The waveguided lump u ∈ [n_s, n_e]: launch up, down, Lambertian re-emission masses. */
  wgUp: number; wgDown: number; wgLamb: number
}

/** u-breakpoints where a tabulated launch density steps (|μ| of every slice edge), inside (lo, hi). */
function profileBreaks(l: Launch, nE: number, lo: number, hi: number): number[] {
  if (!l.mu) return []
  const out: number[] = []
  for (let i = 0; i <= PROFILE_GRID; i++) {
    const mu = Math.abs(l.mu[i]!)
    const u = nE * Math.sqrt(Math.max(0, 1 - mu * mu))
    if (u > lo && u < hi) out.push(u)
  }
  return out
}

function buildNodes(o: Optics, l: Launch): Nodes {
  const { nE, nS } = o
  const uTop = Math.min(nE, nS)
  // panels: [variable kind, a, b] in the panel variable; kind 0: θ_air (u = sinθ), kind 1: angle in medium uTop (u = uTop·sinψ)
  const panels: Array<[number, number, number, number]> = [] // kind, a, b, exit bin
  // u ∈ [0, 1]: per output bin, split at profile steps
  const breaks1 = profileBreaks(l, nE, 0, 1).map((u) => Math.asin(Math.min(1, u)))
  // An index just above 1 puts a near-singularity (cos²θ_air + n² − 1)^−½ just past 90°: panels shrink
  // geometrically towards 90° on its scale √(n² − 1), so Gauss–Legendre stays exact there too.
  for (const n of [nE, nS]) {
    const c = Math.sqrt(n * n - 1)
    if (c > 0 && c < 0.5) for (let k = -6; k <= 4; k++) { const x = c * 2 ** k; if (x < 1) breaks1.push(Math.acos(x)) }
  }
  breaks1.sort((a, b) => a - b)
  let k = 0
  for (let b = 0; b < THETA_BINS; b++) {
    const ta = b * DEG, tb = b === THETA_BINS - 1 ? Math.PI / 2 : (b + 1) * DEG
    let start = ta
    while (k < breaks1.length && breaks1[k]! <= ta) k++
    while (k < breaks1.length && breaks1[k]! < tb) { panels.push([0, start, breaks1[k]!, b]); start = breaks1[k]!; k++ }
    panels.push([0, start, tb, b])
  }
  // u ∈ [1, uTop]: substrate modes (reach the substrate, totally reflected at the top face)
  if (uTop > 1) {
    const psi0 = Math.asin(1 / uTop), psi1 = Math.PI / 2
    const edges: number[] = []
    for (let i = 0; i <= SUBSTRATE_PANELS; i++) edges.push(psi0 + ((psi1 - psi0) * i) / SUBSTRATE_PANELS)
    for (const u of profileBreaks(l, nE, 1, uTop)) edges.push(Math.asin(Math.min(1, u / uTop)))
    edges.sort((a, b) => a - b)
    for (let i = 1; i < edges.length; i++) if (edges[i]! > edges[i - 1]!) panels.push([1, edges[i - 1]!, edges[i]!, -1])
  }
  const count = panels.length * 5
  const n: Nodes = {
    count, u: new Float64Array(count), up: new Float64Array(count), down: new Float64Array(count), lamb: new Float64Array(count),
    bin: new Int32Array(count), wgUp: 0, wgDown: 0, wgLamb: 0,
  }
  let j = 0
  for (const [kind, a, b, bin] of panels) {
    const half = 0.5 * (b - a), mid = 0.5 * (a + b)
    for (let g = 0; g < 5; g++) {
      const v = mid + half * GL5_X[g]!
      const scale = kind === 0 ? 1 : uTop
      const u = scale * Math.sin(v)
      const du = scale * Math.cos(v) * half * GL5_W[g]! // du = scale·cos v dv
      // μ in the emitter (upward); when the range ends at n_e use the angle itself (cosψ, no cancellation)
      const muE = kind === 1 && uTop === nE ? Math.cos(v) : Math.sqrt(Math.max(0, 1 - (u / nE) * (u / nE)))
      // dμ = u/(n_e² μ) du; at n_e's end u/(n_e² μ)·du = sinψ·half·w exactly
      const dmu = kind === 1 && uTop === nE ? Math.sin(v) * half * GL5_W[g]! : (u * du) / (nE * nE * muE)
      n.u[j] = u
      n.up[j] = launchDensity(l, muE) * dmu
      n.down[j] = launchDensity(l, -muE) * dmu
      n.lamb[j] = 2 * muE * dmu
      n.bin[j] = bin
      j++
    }
  }
  if (nE > nS) {
    const mu3 = Math.sqrt(1 - (nS / nE) * (nS / nE))
    n.wgUp = launchMass(l, 0, mu3)
    n.wgDown = launchMass(l, -mu3, 0)
    n.wgLamb = mu3 * mu3
  }
  return n
}

/** Fresnel power reflectances (s, p) for cosI from n1 to n2 (no TIR: the caller checks). */
function fresnelSP(cosI: number, n1: number, n2: number, out: Float64Array): void {
  const sin2T = (n1 / n2) * (n1 / n2) * (1 - cosI * cosI)
  const cosT = Math.sqrt(Math.max(0, 1 - sin2T))
  const a = n1 * cosI, b = n2 * cosT, c = n2 * cosI, d = n1 * cosT
  const rs = (a - b) / (a + b), rp = (c - d) / (c + d)
  out[0] = rs * rs; out[1] = rp * rp
}

/** Per-node, per-channel chain coefficients at one wavelength. */
interface Chain {
  /** channels: 1 (averaged, none) or 2 (polarized: s then p) */
  channels: number
  R1: Float64Array; R2: Float64Array; A: Float64Array
  /** top face totally reflecting (u ≥ 1) */
  tir2: Uint8Array
}

function buildChain(o: Optics, n: Nodes): Chain {
  const channels = o.fresnel === FRESNEL_POLARIZED ? 2 : 1
  const m = n.count * channels
  const ch: Chain = { channels, R1: new Float64Array(m), R2: new Float64Array(m), A: new Float64Array(n.count), tir2: new Uint8Array(n.count) }
  const sp = new Float64Array(2)
  const fresnelOn = o.fresnel !== FRESNEL_NONE
  for (let j = 0; j < n.count; j++) {
    const u = n.u[j]!
    const muE = Math.sqrt(Math.max(0, 1 - (u / o.nE) ** 2))
    const muS = Math.sqrt(Math.max(0, 1 - (u / o.nS) ** 2))
    ch.A[j] = o.alphaPerUm > 0 ? Math.exp((-o.alphaPerUm * o.tUm) / muS) : 1
    ch.tir2[j] = u >= 1 ? 1 : 0
    for (let c = 0; c < channels; c++) {
      let r1 = 0, r2 = 0
      if (fresnelOn && o.nE !== o.nS) { fresnelSP(muE, o.nE, o.nS, sp); r1 = channels === 2 ? sp[c]! : 0.5 * (sp[0]! + sp[1]!) }
      if (fresnelOn && u < 1) { fresnelSP(muS, o.nS, 1, sp); r2 = channels === 2 ? sp[c]! : 0.5 * (sp[0]! + sp[1]!) }
      ch.R1[j * channels + c] = r1
      ch.R2[j * channels + c] = r2
    }
  }
  return ch
}

/**
 * One node and channel, started with mass a in "emitter, going down" and b in "emitter, going up": closed-form
 * sums of the chain with every step weighted by z (z = 1: the outcome probabilities; z > 1: E[z^N] terms for the
 * truncation bound). Adds into out (bins at `bin`, losses), returns the diffuse re-emission mass, or NaN when a
 * loop does not converge at this z.
 */
function nodeSums(z: number, R: number, d: number, trap: boolean, R1: number, R2: number, A: number, tir2: boolean,
  a: number, b: number, bin: number, out: Float64Array, scale: number): number {
  const T1 = 1 - R1
  const rhoB = z * R * (1 - d) // emitter going down → mirrored up
  const L = rhoB * z * R1 // emitter loop: down, mirrored, reflected back down by the emitter/substrate face
  if (!(L < 1)) return NaN
  const inv = 1 / (1 - L)
  const vE = (a + b * z * R1) * inv // visits of "emitter going down"
  const arrS = (a * rhoB + b) * z * T1 * inv // arrivals in "substrate going up"
  const zA = z * A
  const R2eff = tir2 ? (trap ? 0 : 1) : R2
  const Pret = zA * (R1 + (T1 * rhoB * z * T1) * inv) // from "substrate going down" back to "substrate going up"
  const G = zA * R2eff * Pret
  if (!(G < 1)) return NaN
  const vSU = arrS / (1 - G)
  const vSD = vSU * zA * R2eff
  const eE = vSD * zA * T1 // entries into "emitter going down" from the substrate
  const vEall = vE + eE * inv
  out[O_REFLECTOR] = out[O_REFLECTOR]! + scale * z * (1 - R) * vEall
  out[O_SUBSTRATE] = out[O_SUBSTRATE]! + scale * z * (1 - A) * (vSU + vSD)
  let ext = 0
  if (!tir2) { ext = scale * zA * (1 - R2) * vSU; out[bin] = out[bin]! + ext }
  else if (trap) { ext = scale * zA * vSU; out[O_TRAPPED] = out[O_TRAPPED]! + ext }
  const diffuse = scale * z * R * d * vEall
  nodeTotal = scale * (z * (1 - R) * vEall + z * (1 - A) * (vSU + vSD)) + ext + diffuse
  return diffuse
}

/** Sum of all outcomes (diffuse included) of the last nodeSums call. */
let nodeTotal = 0

/** The waveguided lump (u ≥ n_s): up → waveguided; down → reflector, re-emitted, or mirrored up then waveguided. */
function lumpSums(z: number, R: number, d: number, a: number, b: number, out: Float64Array, scale: number): number {
  out[O_WAVEGUIDED] = out[O_WAVEGUIDED]! + scale * (z * b + a * z * R * (1 - d) * z)
  out[O_REFLECTOR] = out[O_REFLECTOR]! + scale * a * z * (1 - R)
  return scale * a * z * R * d
}

/**
 * All nodes at weight z: the launch, then the diffuse renewal. Returns false when a sum diverges at this z. With
 * `perNode`, per-node totals (launch only, no renewal) go there (used to find nodes whose truncation matters).
 */
function sumsAt(z: number, o: Optics, n: Nodes, ch: Chain, out: Float64Array, perNode?: Float64Array): boolean {
  const trap = o.d === 0 || o.R === 0
  const regen = o.R > 0 && o.d > 0
  const C = ch.channels, w = 1 / C
  const direct = new Float64Array(O_LENGTH)
  let D = 0
  for (let j = 0; j < n.count; j++) {
    for (let c = 0; c < C; c++) {
      const dd = nodeSums(z, o.R, o.d, trap, ch.R1[j * C + c]!, ch.R2[j * C + c]!, ch.A[j]!, ch.tir2[j] === 1, n.down[j]!, n.up[j]!, n.bin[j]!, direct, w)
      if (Number.isNaN(dd)) { if (perNode) { perNode[j] = Infinity; continue } return false }
      D += dd
      if (perNode) perNode[j] = perNode[j]! + nodeTotal
    }
  }
  D += lumpSums(z, o.R, o.d, n.wgDown, n.wgUp, direct, 1)
  for (let i = 0; i < O_LENGTH; i++) out[i] = out[i]! + direct[i]!
  if (!regen || D === 0) return true
  // a Lambertian restart: F (outcomes), G (re-emitted again)
  const F = new Float64Array(O_LENGTH)
  let G = 0
  for (let j = 0; j < n.count; j++) {
    for (let c = 0; c < C; c++) {
      const dd = nodeSums(z, o.R, o.d, trap, ch.R1[j * C + c]!, ch.R2[j * C + c]!, ch.A[j]!, ch.tir2[j] === 1, 0, n.lamb[j]!, n.bin[j]!, F, w)
      if (Number.isNaN(dd)) return false
      G += dd
    }
  }
  G += lumpSums(z, o.R, o.d, 0, n.wgLamb, F, 1)
  if (!(G < 1)) return false
  const k = D / (1 - G)
  for (let i = 0; i < O_LENGTH; i++) out[i] = out[i]! + k * F[i]!
  return true
}

/**
 * Outcomes (infinite series) of a unit mass re-emitted diffusely: a Lambertian restart "emitter, going up", its
 * own re-emissions summed by the renewal F/(1 − G).
 */
function lambertianResponse(o: Optics, n: Nodes, ch: Chain): Float64Array {
  const C = ch.channels, w = 1 / C
  const trap = o.d === 0 || o.R === 0
  const F = new Float64Array(O_LENGTH)
  let G = 0
  for (let j = 0; j < n.count; j++) {
    for (let c = 0; c < C; c++) {
      G += nodeSums(1, o.R, o.d, trap, ch.R1[j * C + c]!, ch.R2[j * C + c]!, ch.A[j]!, ch.tir2[j] === 1, 0, n.lamb[j]!, n.bin[j]!, F, w)
    }
  }
  G += lumpSums(1, o.R, o.d, 0, n.wgLamb, F, 1)
  for (let i = 0; i < O_LENGTH; i++) F[i] = F[i]! / (1 - G)
  return F
}

/** Regenerated mass per step below which the rest of the stepping leaves re-emissions to lambertianResponse. */
const SPARSE_RENEWAL = 1e-15
/** A node whose four states hold less than this is no longer stepped (its mass ends up in unresolved, < 1e-20 in all). */
const NODE_NEGLIGIBLE = 1e-24

/**
 * Event-by-event evolution for exactly maxEvents steps (the truncation matters): nodes `only` (no renewal), or
 * every node with the diffuse renewal. Adds the outcomes, and what is still alive after the last step as unresolved.
 * Once the re-emitted mass per step is below SPARSE_RENEWAL, later re-emissions are summed by their infinite series
 * (their own truncation, on at most that mass a step, is neglected) and only nodes still holding mass are stepped:
 * the few slowly decaying ones (grazing, nearly lossless loops) then cost little.
 */
function stepChain(o: Optics, n: Nodes, ch: Chain, out: Float64Array, only: number[] | null, withLump: boolean): void {
  const C = ch.channels, w = 1 / C
  const trap = o.d === 0 || o.R === 0
  const regen = only === null && o.R > 0 && o.d > 0
  const nodes = only ?? Array.from({ length: n.count }, (_, j) => j)
  const m = nodes.length * C
  const eD = new Float64Array(m), eU = new Float64Array(m), sU = new Float64Array(m), sD = new Float64Array(m)
  const lamb = new Float64Array(m)
  for (let i = 0; i < nodes.length; i++) {
    for (let c = 0; c < C; c++) {
      eD[i * C + c] = n.down[nodes[i]!]!; eU[i * C + c] = n.up[nodes[i]!]!; lamb[i * C + c] = n.lamb[nodes[i]!]!
    }
  }
  // the waveguided lump (one channel: no Fresnel decides there), when the caller has not summed it
  let lD = withLump ? n.wgDown : 0, lU = withLump ? n.wgUp : 0
  const R = o.R, d = o.d
  let active = Int32Array.from(nodes.keys()), nActive = nodes.length
  let sparse = false
  let response: Float64Array | null = null
  for (let step = 0; step < o.maxEvents; step++) {
    let diff = 0, alive = 0
    for (let li = 0; li < nActive; li++) {
      const i = active[li]!
      const j = nodes[i]!
      const A = ch.A[j]!, tir2 = ch.tir2[j] === 1, bin = n.bin[j]!
      for (let c = 0; c < C; c++) {
        const q = i * C + c
        const R1 = ch.R1[j * C + c]!, R2 = ch.R2[j * C + c]!, T1 = 1 - R1
        const ed = eD[q]!, eu = eU[q]!, su = sU[q]!, sd = sD[q]!
        out[O_REFLECTOR] = out[O_REFLECTOR]! + w * (1 - R) * ed
        diff += w * R * d * ed
        out[O_SUBSTRATE] = out[O_SUBSTRATE]! + w * (1 - A) * (su + sd)
        let toSD: number
        if (!tir2) { out[bin] = out[bin]! + w * A * (1 - R2) * su; toSD = A * R2 * su }
        else if (trap) { out[O_TRAPPED] = out[O_TRAPPED]! + w * A * su; toSD = 0 }
        else toSD = A * su
        eU[q] = R * (1 - d) * ed
        eD[q] = R1 * eu + A * T1 * sd
        sU[q] = T1 * eu + A * R1 * sd
        sD[q] = toSD
        alive += eU[q]! + eD[q]! + sU[q]! + sD[q]!
      }
    }
    out[O_WAVEGUIDED] = out[O_WAVEGUIDED]! + lU
    out[O_REFLECTOR] = out[O_REFLECTOR]! + (1 - R) * lD
    diff += R * d * lD
    const nextLU = R * (1 - d) * lD
    lD = 0; lU = nextLU
    if (regen && diff > 0) {
      if (!sparse) {
        // re-emitted: a Lambertian restart "emitter, going up" in every channel (fresh random polarisation)
        for (let q = 0; q < m; q++) eU[q] = eU[q]! + diff * lamb[q]!
        lU += diff * n.wgLamb
      } else {
        response ??= lambertianResponse(o, n, ch)
        for (let k = 0; k < O_LENGTH; k++) out[k] = out[k]! + diff * response[k]!
        diff = 0
      }
    }
    alive = alive / C + lU + (regen ? diff : 0)
    if (alive < 1e-18) return
    if (!sparse && (!regen || diff < SPARSE_RENEWAL) && step >= 8) sparse = true
    if (sparse && (step & 15) === 0) {
      // step only the nodes that still hold mass
      const next: number[] = []
      for (let li = 0; li < nActive; li++) {
        const i = active[li]!
        let s = 0
        for (let c = 0; c < C; c++) { const q = i * C + c; s += eD[q]! + eU[q]! + sU[q]! + sD[q]! }
        if (s > NODE_NEGLIGIBLE) next.push(i)
      }
      active = Int32Array.from(next); nActive = next.length
    }
  }
  let left = lD + lU
  for (let q = 0; q < m; q++) left += w * (eD[q]! + eU[q]! + sU[q]! + sD[q]!)
  out[O_UNRESOLVED] = out[O_UNRESOLVED]! + left
}

/** Outcomes per launched ray at one wavelength, added into out with weight `weight`. */
function flatAt(o: Optics, l: Launch, out: Float64Array, weight: number): void {
  const n = buildNodes(o, l)
  const ch = buildChain(o, n)
  const res = new Float64Array(O_LENGTH)
  const M = o.maxEvents
  const z = 1 + 40 / M // z^−M ≤ e^−40·(1 + 40/M)^… : small enough for any M ≥ 1 once E[z^N] is finite and modest
  const zM = Math.pow(z, M)
  const regen = o.R > 0 && o.d > 0
  if (regen) {
    const zs = new Float64Array(O_LENGTH)
    let ok = sumsAt(z, o, n, ch, zs)
    let ez = 0
    if (ok) { for (let i = 0; i < O_LENGTH; i++) ez += zs[i]!; ok = Number.isFinite(ez) && ez / zM < TRUNCATION_TOLERANCE }
    // Unproven (a few grazing nodes decay too slowly for the bound): step exactly when that is affordable, else
    // take the infinite series and neglect the truncation (it concerns only rays still alive after maxEvents
    // events in almost lossless grazing loops, which a traced companion would show as unresolved).
    if (ok || M * n.count * ch.channels > STEPPING_BUDGET) sumsAt(1, o, n, ch, res)
    else stepChain(o, n, ch, res, null, true)
  } else if (M < 2) {
    // the lump's rays need up to 2 events: step everything
    stepChain(o, n, ch, res, Array.from({ length: n.count }, (_, j) => j), true)
  } else {
    // nodes are independent: exact sums where the truncation is negligible, event stepping where it is not
    const perNode = new Float64Array(n.count)
    sumsAt(z, o, n, ch, new Float64Array(O_LENGTH), perNode)
    const slow: number[] = []
    for (let j = 0; j < n.count; j++) if (!(perNode[j]! / zM < TRUNCATION_TOLERANCE)) slow.push(j)
    if (slow.length === 0) sumsAt(1, o, n, ch, res)
    else {
      const keep = { up: n.up, down: n.down }
      const isSlow = new Uint8Array(n.count)
      for (const j of slow) isSlow[j] = 1
      n.up = keep.up.map((v, j) => (isSlow[j] ? 0 : v)); n.down = keep.down.map((v, j) => (isSlow[j] ? 0 : v))
      sumsAt(1, o, n, ch, res) // the fast nodes and the waveguided lump
      n.up = keep.up; n.down = keep.down
      stepChain(o, n, ch, res, slow, false)
    }
  }
  for (let i = 0; i < O_LENGTH; i++) out[i] = out[i]! + weight * res[i]!
}

/** Outcome vector (per launched ray: extracted per 1° bin, then reflector, substrate, waveguided, trapped, unresolved) of a packed planar scene. */
export function flatOutcomes(scene: PackedScene): Float64Array {
  const l = launchOf(scene)
  const base: Optics = {
    nE: scene[S_N_EMITTER]!, nS: scene[S_N_SUBSTRATE]!, alphaPerUm: scene[S_ABSORPTION_PER_UM]!, tUm: scene[S_THICKNESS_UM]!,
    R: scene[S_REFLECTANCE]!, d: scene[S_DIFFUSE_FRACTION]!, fresnel: scene[S_FRESNEL]!, maxEvents: scene[S_MAX_EVENTS]!,
  }
  const out = new Float64Array(O_LENGTH)
  const at = scene[S_SPECTRAL_OFFSET]!
  if (!(at > 0)) { flatAt(base, l, out, 1); return out }
  // per wavelength cell: indices and absorption at the cell's middle, weighted by the cell's share of the spectrum
  const K = SPECTRAL_GRID
  let constant = true
  for (let j = 1; j <= K && constant; j++) {
    constant = scene[at + spectralSlot(j, SP_NE)] === scene[at + spectralSlot(0, SP_NE)]
      && scene[at + spectralSlot(j, SP_NS)] === scene[at + spectralSlot(0, SP_NS)]
      && scene[at + spectralSlot(j, SP_AS)] === scene[at + spectralSlot(0, SP_AS)]
  }
  if (constant) {
    flatAt({ ...base, nE: scene[at + spectralSlot(0, SP_NE)]!, nS: scene[at + spectralSlot(0, SP_NS)]!, alphaPerUm: scene[at + spectralSlot(0, SP_AS)]! },
      l, out, 1)
    return out
  }
  // The outcome is a smooth function of wavelength (through n_e, n_s, α): evaluated every SPECTRAL_STRIDE grid
  // nodes and carried to each cell's middle by 4-point Lagrange interpolation, so Σ_cells w·f(mid) = Σ_nodes c·f(node).
  const g = SPECTRAL_STRIDE, E = K / g + 1
  const coef = new Float64Array(E)
  for (let j = 0; j < K; j++) {
    const w = scene[at + spectralSlot(j + 1, SP_CDF)]! - scene[at + spectralSlot(j, SP_CDF)]!
    if (!(w > 0)) continue
    const x = (j + 0.5) / g
    const e0 = Math.min(Math.max(Math.floor(x) - 1, 0), E - 4)
    for (let a = 0; a < 4; a++) {
      let L = 1
      for (let b = 0; b < 4; b++) if (b !== a) L *= (x - (e0 + b)) / (a - b)
      coef[e0 + a] = coef[e0 + a]! + w * L
    }
  }
  for (let e = 0; e < E; e++) {
    if (coef[e] === 0) continue
    const j = e * g
    flatAt({ ...base, nE: scene[at + spectralSlot(j, SP_NE)]!, nS: scene[at + spectralSlot(j, SP_NS)]!, alphaPerUm: scene[at + spectralSlot(j, SP_AS)]! },
      l, out, coef[e]!)
  }
  return out
}

/** The planar block of the result for a scenario's flat companion (the scenario's lens array is ignored). */
export function flatCompanionOfScene(scene: PackedScene): FlatCompanion {
  const o = flatOutcomes(scene)
  const perSteradian: number[] = [], luminanceRelative: number[] = []
  let extraction = 0
  for (let b = 0; b < THETA_BINS; b++) {
    const ta = b * DEG, tb = (b + 1) * DEG
    const m = o[b]!
    extraction += m
    perSteradian.push(m / (2 * Math.PI * (Math.cos(ta) - Math.cos(tb))))
    luminanceRelative.push(m / (Math.sin(tb) ** 2 - Math.sin(ta) ** 2))
  }
  const zeros = () => new Array<number>(THETA_BINS).fill(0)
  const losses: Losses = {
    reflector: o[O_REFLECTOR]!, substrate: o[O_SUBSTRATE]!, waveguided: o[O_WAVEGUIDED]!, trapped: o[O_TRAPPED]!, unresolved: o[O_UNRESOLVED]!,
  }
  return {
    method: 'quadrature', extraction, extractionStdErr: 0, losses,
    perSteradian, perSteradianStdErr: zeros(), luminanceRelative, luminanceRelativeStdErr: zeros(),
  }
}

const cache = new Map<string, FlatCompanion>()
const CACHE_ENTRIES = 32

/** The flat companion of a scenario by quadrature (cached by the scenario's optics), or null when it does not apply. */
export function flatCompanion(sc: Scenario): FlatCompanion | null {
  if (!flatQuadratureApplies(sc) || sc.emitter.thinFilm !== undefined) return null
  const key = JSON.stringify([sc.emitter, sc.reflector, sc.substrate, sc.trace.fresnel, sc.trace.maxEvents])
  const hit = cache.get(key)
  if (hit) return hit
  const scene = packScene(sc, { planar: true })
  if (scene[S_SOURCE] !== SOURCE_EXTENDED) return null
  const r = flatCompanionOfScene(scene)
  if (cache.size >= CACHE_ENTRIES) cache.delete(cache.keys().next().value!)
  cache.set(key, r)
  return r
}

/**
 * The launch density per unit μ (signed emission cosine in the emitter; azimuth uniform) of a packed scene, as the
 * launch samples it: isotropic ½, Lambertian 2μ (μ > 0), a table's piecewise-constant grid. Per steradian: f(μ)/2π.
 */
export function emissionDensityOf(scene: PackedScene): (mu: number) => number {
  const l = launchOf(scene)
  return (mu) => launchDensity(l, mu)
}
