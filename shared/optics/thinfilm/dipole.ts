// Dipole emission inside the stack: power dissipation spectra, Purcell factor, the power entering the glass per
// solid angle and polarisation, the mode split and the exact flat-device outcoupling. Plane-wave expansion after
// Chance, Prock & Silbey, Adv. Chem. Phys. 37, 1 (1978); Neyts, JOSA A 15, 962 (1998); notation of Furno et al.,
// Phys. Rev. B 85, 115205 (2012): u = k_x/k_e (k_e = k0·n_e in the emitting layer), q_e = √(1 − u²) (Im ≥ 0),
// a± = r± e^{2i k0 w_e z±} the reflection of the stacks above/below referred to the dipole plane, and
//   K_TE,h = ¾ Re[u/q_e · (1 + a₊)(1 + a₋)/(1 − a₊a₋)]
//   K_TM,h = ¾ Re[u·q_e · (1 − a₊)(1 − a₋)/(1 − a₊a₋)]          (r_p on the magnetic field)
//   K_TM,v = 3/2 Re[u³/q_e · (1 + a₊)(1 + a₋)/(1 − a₊a₋)]
// so that ∫K du = 1 for each orientation in the infinite emitting medium. Power leaving through the glass: the
// down-going amplitude at the dipole plane is D = (σ + a₊)/(1 − a₊a₋) (σ = +1 for TE,h and TM,v, −1 for TM,h),
// carried to the glass with the lower stack's transmission t₋ and weighed by the glass admittance (flux ∝ Re Y |a|²).
// Per-dipole-power fractions are relative to the orientation-mixed F = Θ·F_h + (1 − Θ)·F_v. Lengths nm, angles rad.
import type { ThinFilm } from '../../types/thin-film'
import { airy, prepareStack, setAdmittance, setKappa, type PreparedStack } from './stack'

/** Integrand slots: K (3), power into glass (3), into a transparent top medium (3), reaching air (3). */
const NV = 12
export const V_K_TEH = 0, V_K_TMH = 1, V_K_TMV = 2, V_G_TEH = 3, V_G_TMH = 4, V_G_TMV = 5
export const V_T_TEH = 6, V_T_TMH = 7, V_T_TMV = 8, V_A_TEH = 9, V_A_TMH = 10, V_A_TMV = 11

/** The glass and what lies beyond it (the flat device). */
export interface ThinFilmOptics {
  glassIndex: number
  /** glass thickness for the per-pass absorption A = exp(−α·t/cosθ); 0 = lossless glass */
  glassThicknessUm?: number
  glassAbsorptionPerMm?: number
  /** the medium beyond the glass (air) */
  outsideIndex?: number
}

const rt = new Float64Array(16)

/**
 * All integrand slots at u (per unit u) into v[0..11]. The glass and air slots are zero where the glass does not
 * propagate; the top slots are zero unless the cathode is a lossless medium in which the wave propagates.
 */
export function integrandAt(P: PreparedStack, opt: Required<ThinFilmOptics>, alphaT: number, u: number, v: Float64Array): void {
  const e = P.e, M = P.M, ne = P.ne
  const kappa = ne * u
  setKappa(P, kappa)
  const w = P.w
  const wer = w[2 * e]!, wei = w[2 * e + 1]!
  const qer = wer / ne, qei = wei / ne
  const qe2 = qer * qer + qei * qei
  // u = 1 exactly in the lossless emitting layer (q_e = 0) is a measure-zero point of an integrable singularity
  if (qe2 === 0) { v.fill(0); return }
  // e^{2i k0 w_e z±}: phase and decay between the dipole plane and the layer's boundaries
  const em = Math.exp(-2 * wei * P.zm), ep = Math.exp(-2 * wei * P.zp)
  const pmr = em * Math.cos(2 * wer * P.zm), pmi = em * Math.sin(2 * wer * P.zm)
  const ppr = ep * Math.cos(2 * wer * P.zp), ppi = ep * Math.sin(2 * wer * P.zp)
  const wgr = w[0]!, wtr = w[2 * (M - 1)]!, wti = w[2 * (M - 1) + 1]!
  // a wave carries power into the glass / top only if it propagates there (lossless outer media: Im w = 0)
  const glassOpen = w[1] === 0 && wgr > 0
  const topOpen = P.ei[M - 1] === 0 && wti === 0 && wtr > 0
  let airS = 0
  for (let pol = 0; pol < 2; pol++) {
    const p = pol === 1
    setAdmittance(P, p)
    airy(P, 0, e, rt, 0) // r₋, t₋ (seen from the emitting layer at its lower boundary)
    airy(P, M - 1, 0, rt, 8, e) // glass-side stack reflection at 8..11; r₊, t₊ at 12..15
    const amr = rt[0]! * pmr - rt[1]! * pmi, ami = rt[0]! * pmi + rt[1]! * pmr
    const apr = rt[12]! * ppr - rt[13]! * ppi, api = rt[12]! * ppi + rt[13]! * ppr
    // den = 1 − a₊a₋
    const dr = 1 - (apr * amr - api * ami), di = -(apr * ami + api * amr)
    const dd = dr * dr + di * di
    const sg = p ? -1 : 1 // σ for the horizontal dipole in this polarisation
    // (1 + σa₊)(1 + σa₋)/den
    const xr = 1 + sg * apr, xi = sg * api, yr = 1 + sg * amr, yi = sg * ami
    const nr = xr * yr - xi * yi, ni = xr * yi + xi * yr
    const fr = (nr * dr + ni * di) / dd, fi = (ni * dr - nr * di) / dd
    const tm2 = rt[2]! * rt[2]! + rt[3]! * rt[3]!
    const tp2 = rt[14]! * rt[14]! + rt[15]! * rt[15]!
    const yg = P.y[0]!, yt = P.y[2 * (M - 1)]!
    if (!p) {
      // Re[f/q_e]
      v[V_K_TEH] = 0.75 * u * (fr * qer + fi * qei) / qe2
      const gTE = glassOpen ? 0.375 * u * (yg / ne) / qe2 * ((xr * xr + xi * xi) / dd) * em * tm2 : 0
      v[V_G_TEH] = gTE
      v[V_T_TEH] = topOpen ? 0.375 * u * (yt / ne) / qe2 * ((yr * yr + yi * yi) / dd) * ep * tp2 : 0
      if (glassOpen) airS = gTE
    } else {
      v[V_K_TMH] = 0.75 * u * (fr * qer - fi * qei)
      // the vertical dipole has σ = +1 in p: (1 + a₊)(1 + a₋)/den
      const vxr = 1 + apr, vxi = api, vyr = 1 + amr, vyi = ami
      const vnr = vxr * vyr - vxi * vyi, vni = vxr * vyi + vxi * vyr
      const gr = (vnr * dr + vni * di) / dd, gi = (vni * dr - vnr * di) / dd
      v[V_K_TMV] = 1.5 * u * u * u * (gr * qer + gi * qei) / qe2
      const gH = glassOpen ? 0.375 * u * ne * yg * ((xr * xr + xi * xi) / dd) * em * tm2 : 0
      const gV = glassOpen ? 0.75 * u * u * u * ne * yg / qe2 * ((vxr * vxr + vxi * vxi) / dd) * em * tm2 : 0
      v[V_G_TMH] = gH
      v[V_G_TMV] = gV
      v[V_T_TMH] = topOpen ? 0.375 * u * ne * yt * ((yr * yr + yi * yi) / dd) * ep * tp2 : 0
      v[V_T_TMV] = topOpen ? 0.75 * u * u * u * ne * yt / qe2 * ((vyr * vyr + vyi * vyi) / dd) * ep * tp2 : 0
    }
    // flat device: glass treated incoherently, factor T_ga·A/(1 − R_stack·R_ga·A²) per polarisation
    let f = 0
    if (glassOpen) {
      const no = opt.outsideIndex, ng = P.ng
      const cg = wgr / ng
      const o2 = no * no - kappa * kappa
      if (o2 > 0) {
        const wo = Math.sqrt(o2)
        // s: Y = w; p: Y = w/ε
        const a = p ? wgr / (ng * ng) : wgr, b = p ? wo / (no * no) : wo
        const rga = ((a - b) / (a + b)) ** 2
        const A = alphaT > 0 ? Math.exp(-alphaT / cg) : 1
        const rst = rt[8]! * rt[8]! + rt[9]! * rt[9]!
        f = ((1 - rga) * A) / (1 - rst * rga * A * A)
      }
    }
    if (!p) v[V_A_TEH] = airS * f
    else { v[V_A_TMH] = v[V_G_TMH]! * f; v[V_A_TMV] = v[V_G_TMV]! * f }
  }
}

// Gauss–Kronrod 7–15 nodes on [−1, 1] (Kronrod 1965; tabulated in QUADPACK, Piessens et al. 1983).
const XGK = [0.9914553711208126, 0.9491079123427585, 0.8648644233597691, 0.7415311855993945, 0.5860872354676911, 0.4058451513773972, 0.20778495500789848, 0]
const WGK = [0.022935322010529224, 0.06309209262997856, 0.10479001032225019, 0.14065325971552592, 0.1690047266392679, 0.19035057806478542, 0.20443294007529889,
  0.20948214108472782]
const WG = [0.1294849661688697, 0.27970539148927664, 0.3818300505051189, 0.4179591836734694]

/** What one wavelength's integration returns: per-slot integrals split by u region. */
export interface RegionIntegrals {
  /** [region][slot]: region 0 glass-propagating u, 1 waveguided, 2 evanescent */
  r: Float64Array[]
  evaluations: number
}

/**
 * Adaptive G7K15 over u on fixed breakpoints, in a variable that removes the 1/√(1 − u²) endpoint singularity:
 * u = sin θ below 1 (du = cos θ dθ), u = cosh τ above 1 (du = sinh τ dτ). Absolute tolerance TOL per subinterval
 * on the K slots (K is O(1) and F is a sum of a few dozen subintervals, so 1e-9 keeps F good to ~1e-7; the G7–K15
 * difference overstates the true error by orders of magnitude on smooth pieces).
 */
const TOL = 1e-9
/** Relative part of the tolerance: a mode peak (K ~ 1e5 over δu ~ 1e-6) needs 1e-7 of its own weight, not 1e-9
 *  absolute, or every panel beside it would be split to rounding level. */
const RTOL = 1e-7
const MAX_DEPTH = 50
/** A backstop against pathological stacks (no real stack comes near: the reference stack needs ~2e3). */
const MAX_EVALUATIONS = 400_000

export function integrateStack(P: PreparedStack, opt: Required<ThinFilmOptics>): RegionIntegrals {
  const ne = P.ne
  const alphaT = ((opt.glassAbsorptionPerMm ?? 0) / 1000) * (opt.glassThicknessUm ?? 0)
  const ug = P.ng / ne
  // Beyond u_max every field at the dipole has decayed by e^{−46} ≈ 1e-20 across the distance to the nearest index
  // step (k0·w_e ≈ k_e·√(u² − 1)); that step is floored at 0.05 nm (k0-scaled), below which a continuum stack model
  // is meaningless anyway (quenching at contact diverges).
  const zNear = Math.max(P.zNear, (0.05 * 2 * Math.PI) / P.wavelengthNm)
  const tauMax = Math.asinh(23 / (ne * zNear))
  const breaks = new Set<number>([0, 1, ug, opt.outsideIndex / ne])
  for (let j = 0; j < P.M; j++) {
    // branch points √(ε_j − κ²) of (nearly) lossless media, and the surface-plasmon pole at a metal/dielectric pair
    const n = Math.sqrt((Math.hypot(P.er[j]!, P.ei[j]!) + P.er[j]!) / 2)
    breaks.add(n / ne)
    if (P.er[j]! < 0 && j > 0) {
      const ed = P.er[j - 1]!, em = P.er[j]!
      if (ed + em < 0) breaks.add(Math.sqrt((ed * em) / (ed + em)) / ne)
    }
  }
  const uMax = Math.cosh(tauMax)
  // Mode poles: guided modes lie below the highest layer index, the surface plasmon a little above κ_sp; scan the
  // non-radiating part of that range for minima of |1 − a₊a₋| per polarisation and make each a breakpoint.
  let kTop = 0
  for (const b of breaks) kTop = Math.max(kTop, b)
  // (minima within 1e-6 of an existing breakpoint are the branch points themselves, e.g. u = 1, not modes)
  const known = [...breaks]
  for (const u of findPoles(P, Math.min(ug, 1), Math.min(uMax, kTop * 1.2))) {
    if (known.every((b) => Math.abs(b - u) > 1e-6)) breaks.add(u)
  }
  const pts = [...breaks].filter((b) => b >= 0 && b <= uMax).sort((a, b) => a - b)
  if (pts[pts.length - 1]! < uMax) pts.push(uMax)
  const r = [new Float64Array(NV), new Float64Array(NV), new Float64Array(NV)]
  const v = new Float64Array(NV)
  const kr = new Float64Array(NV), gr = new Float64Array(NV)
  let evaluations = 0
  const uOf = (x: number, hyper: boolean) => (hyper ? Math.cosh(x) : Math.sin(x))
  const jac = (x: number, hyper: boolean) => (hyper ? Math.sinh(x) : Math.cos(x))
  const stack: number[] = []
  for (let s = 0; s + 1 < pts.length; s++) {
    const ua = pts[s]!, ub = pts[s + 1]!
    if (!(ub > ua)) continue
    const hyper = ua >= 1
    const region = ub <= ug ? 0 : ub <= 1 ? 1 : 2
    const xa = hyper ? Math.acosh(ua) : Math.asin(Math.min(1, ua))
    const xb = hyper ? Math.acosh(ub) : Math.asin(Math.min(1, ub))
    const acc = r[region]!
    stack.push(xa, xb, 0)
    while (stack.length) {
      const depth = stack.pop()!, b = stack.pop()!, a = stack.pop()!
      const c = 0.5 * (a + b), h = 0.5 * (b - a)
      kr.fill(0); gr.fill(0)
      for (let i = 0; i < 15; i++) {
        const node = i < 7 ? -XGK[i]! : i === 7 ? 0 : XGK[14 - i]!
        const wi = i < 7 ? WGK[i]! : i === 7 ? WGK[7]! : WGK[14 - i]!
        const gi = i % 2 === 1 ? WG[(i < 7 ? i : 14 - i) >> 1]! : 0
        const x = c + h * node
        integrandAt(P, opt, alphaT, uOf(x, hyper), v)
        evaluations++
        const jx = jac(x, hyper)
        for (let k = 0; k < NV; k++) {
          const f = v[k]! * jx
          kr[k] = kr[k]! + wi * f
          gr[k] = gr[k]! + gi * f
        }
      }
      const err = h * (Math.abs(kr[0]! - gr[0]!) + Math.abs(kr[1]! - gr[1]!) + Math.abs(kr[2]! - gr[2]!) + Math.abs(kr[3]! - gr[3]!)
        + Math.abs(kr[5]! - gr[5]!))
      const mag = h * (Math.abs(kr[0]!) + Math.abs(kr[1]!) + Math.abs(kr[2]!))
      if (err <= TOL + RTOL * mag || depth >= MAX_DEPTH || evaluations > MAX_EVALUATIONS) {
        for (let k = 0; k < NV; k++) acc[k] = acc[k]! + h * kr[k]!
      } else {
        stack.push(a, c, depth + 1, c, b, depth + 1)
      }
    }
  }
  return { r, evaluations }
}

const den = new Float64Array(16)
/** |1 − a₊a₋|² at u for one polarisation (the mode condition is a zero of it). */
function denominator2(P: PreparedStack, u: number, p: boolean): number {
  const e = P.e
  setKappa(P, P.ne * u)
  setAdmittance(P, p)
  airy(P, 0, e, den, 0)
  airy(P, P.M - 1, e, den, 4)
  const wer = P.w[2 * e]!, wei = P.w[2 * e + 1]!
  // a₊a₋ = r₊r₋ e^{2i k0 w_e (z₊ + z₋)}
  const z = P.zm + P.zp
  const a = Math.exp(-2 * wei * z)
  const pr = a * Math.cos(2 * wer * z), pi = a * Math.sin(2 * wer * z)
  const rr = den[0]! * den[4]! - den[1]! * den[5]!, ri = den[0]! * den[5]! + den[1]! * den[4]!
  const xr = 1 - (rr * pr - ri * pi), xi = -(rr * pi + ri * pr)
  return xr * xr + xi * xi
}

/** Grid spacing of the pole scan: 1/POLE_GRID of the range (modes closer than that are rare and still resolved
 *  by bisection as long as one of them is a breakpoint). */
const POLE_GRID = 400

/** Local minima of |1 − a₊a₋| in (ua, ub), refined by golden section to ~1e-12 in u. */
export function findPoles(P: PreparedStack, ua: number, ub: number): number[] {
  const out: number[] = []
  if (!(ub > ua)) return out
  const h = (ub - ua) / POLE_GRID
  for (const p of [false, true]) {
    let f0 = denominator2(P, ua + 0.5 * h, p), f1 = denominator2(P, ua + 1.5 * h, p)
    for (let i = 2; i < POLE_GRID; i++) {
      const f2 = denominator2(P, ua + (i + 0.5) * h, p)
      if (f1 < f0 && f1 <= f2) {
        let a = ua + (i - 1.5) * h, b = ua + (i + 0.5) * h
        const g = (Math.sqrt(5) - 1) / 2
        let c = b - g * (b - a), d = a + g * (b - a)
        let fc = denominator2(P, c, p), fd = denominator2(P, d, p)
        while (b - a > 1e-12) {
          if (fc < fd) { b = d; d = c; fd = fc; c = b - g * (b - a); fc = denominator2(P, c, p) }
          else { a = c; c = d; fc = fd; d = a + g * (b - a); fd = denominator2(P, d, p) }
        }
        out.push(0.5 * (a + b))
      }
      f0 = f1; f1 = f2
    }
  }
  return out
}

function fullOptics(o: ThinFilmOptics): Required<ThinFilmOptics> {
  return { glassIndex: o.glassIndex, glassThicknessUm: o.glassThicknessUm ?? 0, glassAbsorptionPerMm: o.glassAbsorptionPerMm ?? 0,
    outsideIndex: o.outsideIndex ?? 1 }
}

/** One wavelength's outcome. Every fraction is of the total (orientation-mixed) dipole power F. */
export interface ThinFilmPoint {
  wavelengthNm: number
  /** Purcell factors ∫K du (free emitting medium = 1): per component, horizontal, vertical and the Θ mix */
  purcell: { teH: number; tmH: number; tmV: number; horizontal: number; vertical: number; mixed: number }
  /** qF/(1 − q + qF) */
  effectiveRadiativeEfficiency: number
  /** power into the glass, fraction of F, per polarisation */
  glassS: number
  glassP: number
  /**
   * Flat-device mode split, fractions of F summing to 1: air (glass incoherent, multiple passes), glassTrapped
   * (entered the glass, never reached air: total reflection, glass absorption, re-absorbed by the stack),
   * waveguided (n_g/n_e < u < 1), evanescent (u > 1: surface plasmons and lossy surface waves), absorbed (emitted
   * at glass-propagating u but absorbed in the stack), top (left through a transparent top medium; 0 for a metal).
   */
  modes: { air: number; glassTrapped: number; waveguided: number; evanescent: number; absorbed: number; top: number }
  /** η_air of the flat device per polarisation (fractions of F) */
  airS: number
  airP: number
  /** integrand evaluations used (for the bench) */
  evaluations: number
}

function assemble(tf: ThinFilm, P: PreparedStack, I: RegionIntegrals): ThinFilmPoint {
  const th = tf.horizontalDipoleFraction, q = tf.radiativeEfficiency
  const tot = new Float64Array(NV)
  for (const reg of I.r) for (let k = 0; k < NV; k++) tot[k] = tot[k]! + reg[k]!
  const mix = (a: Float64Array, h1: number, h2: number, vv: number) => th * (a[h1]! + a[h2]!) + (1 - th) * a[vv]!
  const F = mix(tot, V_K_TEH, V_K_TMH, V_K_TMV)
  const glassS = (th * tot[V_G_TEH]!) / F
  const glassP = (th * tot[V_G_TMH]! + (1 - th) * tot[V_G_TMV]!) / F
  const airS = (th * tot[V_A_TEH]!) / F
  const airP = (th * tot[V_A_TMH]! + (1 - th) * tot[V_A_TMV]!) / F
  const topOf = (a: Float64Array) => mix(a, V_T_TEH, V_T_TMH, V_T_TMV) / F
  const kOf = (a: Float64Array) => mix(a, V_K_TEH, V_K_TMH, V_K_TMV) / F
  const [r0, r1, r2] = I.r as [Float64Array, Float64Array, Float64Array]
  const glass = glassS + glassP
  return {
    wavelengthNm: P.wavelengthNm,
    purcell: { teH: tot[0]!, tmH: tot[1]!, tmV: tot[2]!, horizontal: tot[0]! + tot[1]!, vertical: tot[2]!, mixed: F },
    effectiveRadiativeEfficiency: (q * F) / (1 - q + q * F),
    glassS, glassP, airS, airP,
    modes: {
      air: airS + airP,
      glassTrapped: glass - airS - airP,
      waveguided: kOf(r1) - topOf(r1),
      evanescent: kOf(r2) - topOf(r2),
      absorbed: kOf(r0) - glass - topOf(r0),
      top: topOf(r0) + topOf(r1) + topOf(r2),
    },
    evaluations: I.evaluations,
  }
}

/** The stack at one wavelength (throws if the stack has no emitting layer: validate with thinFilmSchema first). */
export function thinFilmAt(tf: ThinFilm, wavelengthNm: number, optics: ThinFilmOptics): ThinFilmPoint {
  const P = prepareStack(tf, optics.glassIndex, wavelengthNm)
  if (P.e < 0) throw new Error('the stack has no emitting layer')
  return assemble(tf, P, integrateStack(P, fullOptics(optics)))
}

/**
 * Power entering the glass per steradian (fraction of F per sr), per polarisation, at glass angles thetaGlassRad
 * (from the normal, into the glass): the future ray source's angular distribution. From the per-u power P(u):
 * P_Ω = P(u)·(du/dθ_g)/(2π sin θ_g) = (P(u)/u)·(n_g/n_e)²·cos θ_g/(2π).
 */
export function glassAngular(tf: ThinFilm, wavelengthNm: number, optics: ThinFilmOptics, thetaGlassRad: ArrayLike<number>,
  F?: number): { s: Float64Array; p: Float64Array } {
  const P = prepareStack(tf, optics.glassIndex, wavelengthNm)
  if (P.e < 0) throw new Error('the stack has no emitting layer')
  const opt = fullOptics(optics)
  const Fm = F ?? thinFilmAt(tf, wavelengthNm, optics).purcell.mixed
  const th = tf.horizontalDipoleFraction
  const s = new Float64Array(thetaGlassRad.length), p = new Float64Array(thetaGlassRad.length)
  const v = new Float64Array(NV)
  const ratio = P.ng / P.ne
  for (let i = 0; i < thetaGlassRad.length; i++) {
    const tg = thetaGlassRad[i]!
    // P(u)/u is finite at u → 0; evaluate at a u small enough (1e-7 rad) that P/u has converged to ~1e-14
    const u = Math.max(ratio * Math.sin(tg), 1e-7)
    integrandAt(P, opt, 0, u, v)
    const g = (ratio * ratio * Math.cos(tg)) / (2 * Math.PI * u * Fm)
    s[i] = th * v[V_G_TEH]! * g
    p[i] = (th * v[V_G_TMH]! + (1 - th) * v[V_G_TMV]!) * g
  }
  return { s, p }
}

/** K(u) for the chart: per component and the Θ mix, at the given u (u ≠ 1). */
export function dissipationSpectrum(tf: ThinFilm, wavelengthNm: number, optics: ThinFilmOptics,
  u: ArrayLike<number>): { teH: Float64Array; tmH: Float64Array; tmV: Float64Array; mixed: Float64Array } {
  const P = prepareStack(tf, optics.glassIndex, wavelengthNm)
  if (P.e < 0) throw new Error('the stack has no emitting layer')
  const opt = fullOptics(optics)
  const out = { teH: new Float64Array(u.length), tmH: new Float64Array(u.length), tmV: new Float64Array(u.length), mixed: new Float64Array(u.length) }
  const v = new Float64Array(NV)
  const th = tf.horizontalDipoleFraction
  for (let i = 0; i < u.length; i++) {
    integrandAt(P, opt, 0, u[i]!, v)
    out.teH[i] = v[0]!; out.tmH[i] = v[1]!; out.tmV[i] = v[2]!
    out.mixed[i] = th * (v[0]! + v[1]!) + (1 - th) * v[2]!
  }
  return out
}

export { prepareStack }
