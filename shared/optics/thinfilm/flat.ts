// The flat device of a thin-film source, exactly (no rays): the stack under a flat glass sheet in air. The glass is
// many wavelengths thick, so it is treated incoherently: light entering the glass at θ (power P(θ) per sr, from the
// dipole expansion) bounces between the glass/air face (power reflectance R_ga, transmittance T_ga = 1 − R_ga) and
// the stack (its own coherent R_st(θ)), losing A = exp(−α·t/cos θ) per pass through the glass; summing the
// geometric series of passes,
//   air = A·T_ga/(1 − ρ),  glass absorption = (1 − A)(1 + A·R_ga)/(1 − ρ),  back in the stack = A²·R_ga(1 − R_st)/(1 − ρ),
//   ρ = R_st·R_ga·A²,
// per polarisation with Fresnel mode "polarized" (s and p are eigenstates of a planar stack), with the
// polarisation-averaged R_ga and R_st with "averaged" (what the traced rays of that mode see), and R_ga = 0 below
// the critical angle with "none". Beyond the critical angle the tracer ends a ray totally reflected at the top face
// of the planar device as trapped (it can never leave): glass absorption 1 − A on the way up, trapped A.
// Air angle bins of 1° are integrated over the glass angles that refract into them (Snell: n_g sin θ_g = sin θ_air),
// 4-point Gauss–Legendre per bin in θ_g; the totally reflected range by 32 panels of 4 points. Fractions of all
// dipole power, weighted over the wavelength nodes (source.ts). This is the enhancement's reference for a
// thin-film scenario.
import { extinctionAt, type Scenario } from '../../types/scenario'
import { fresnelRp, fresnelRs } from '../crossings'
import { glassAngular } from './dipole'
import { prepareStack, stackReflectance } from './stack'
import type { ThinFilmSource } from './source'

export const FLAT_BINS = 90

export interface ThinFilmFlat {
  /** Fraction of all dipole power reaching air. */
  extraction: number
  /** Per 1° air bin (θ from the normal), fraction of all dipole power. */
  airBins: Float64Array
  /** Fractions of all dipole power that entered the glass and ended in the glass, trapped, or back in the stack. */
  substrate: number
  trapped: number
  stackAbsorbed: number
  /** What entered the glass (for closure checks: extraction + substrate + trapped + stackAbsorbed = glass). */
  glass: number
}

// Gauss–Legendre 4 points on [−1, 1] (Abramowitz & Stegun, Table 25.4).
const GX = [-0.8611363115940526, -0.3399810435848563, 0.3399810435848563, 0.8611363115940526]
const GW = [0.3478548451374538, 0.6521451548625461, 0.6521451548625461, 0.3478548451374538]
const TIR_PANELS = 32

/** The exact flat device for a scenario whose thin-film source is `src` (glass thickness, absorption and Fresnel mode from sc). */
export function thinFilmFlat(sc: Scenario, src: ThinFilmSource): ThinFilmFlat {
  const airBins = new Float64Array(FLAT_BINS)
  let substrate = 0, trapped = 0, stackAbsorbed = 0, glass = 0
  const mode = sc.trace.fresnel
  const tUm = sc.substrate.thicknessUm
  for (const node of src.nodes) {
    if (!(node.weight > 0)) continue
    const lam = node.wavelengthNm, ng = node.glassIndex
    const alphaPerUm = sc.substrate.absorptionPerMm / 1000 + (4 * Math.PI * extinctionAt(sc.substrate.index, lam)) / (lam / 1000)
    // the glass angles: 4 per air bin, then 4 per panel of the totally reflected range
    const thetaC = ng > 1 ? Math.asin(1 / ng) : Math.PI / 2
    const th: number[] = [], wt: number[] = [], bin: number[] = []
    const DEG = Math.PI / 180
    for (let b = 0; b < FLAT_BINS; b++) {
      const ga = Math.asin(Math.sin(b * DEG) / ng), gb = Math.asin(Math.min(1, Math.sin((b + 1) * DEG) / ng))
      for (let i = 0; i < 4; i++) { th.push(0.5 * (ga + gb) + 0.5 * (gb - ga) * GX[i]!); wt.push(0.5 * (gb - ga) * GW[i]!); bin.push(b) }
    }
    const h = (Math.PI / 2 - thetaC) / TIR_PANELS
    for (let p = 0; p < TIR_PANELS; p++) {
      const a = thetaC + p * h
      for (let i = 0; i < 4; i++) { th.push(a + 0.5 * h * (1 + GX[i]!)); wt.push(0.5 * h * GW[i]!); bin.push(-1) }
    }
    const P = glassAngular(src.stack, lam, { glassIndex: ng }, th, node.point.purcell.mixed)
    const S = prepareStack(src.stack, ng, lam)
    for (let i = 0; i < th.length; i++) {
      const t = th[i]!, c = Math.cos(t)
      const dOmega = 2 * Math.PI * Math.sin(t) * wt[i]! * node.weight
      const ps = P.s[i]! * dOmega, pp = P.p[i]! * dOmega
      glass += ps + pp
      const A = alphaPerUm > 0 ? Math.exp(-(alphaPerUm * tUm) / c) : 1
      if (bin[i]! < 0) {
        substrate += (1 - A) * (ps + pp)
        trapped += A * (ps + pp)
        continue
      }
      const st = stackReflectance(S, t)
      const gs = mode === 'none' ? 0 : fresnelRs(c, ng, 1), gp = mode === 'none' ? 0 : fresnelRp(c, ng, 1)
      const add = (pw: number, rg: number, rst: number) => {
        const rho = rst * rg * A * A
        const air = (A * (1 - rg)) / (1 - rho)
        airBins[bin[i]!] = airBins[bin[i]!]! + pw * air
        substrate += (pw * (1 - A) * (1 + A * rg)) / (1 - rho)
        stackAbsorbed += (pw * A * A * rg * (1 - rst)) / (1 - rho)
      }
      if (mode === 'polarized') { add(ps, gs, st.rs); add(pp, gp, st.rp) } else add(ps + pp, 0.5 * (gs + gp), 0.5 * (st.rs + st.rp))
    }
  }
  let extraction = 0
  for (let b = 0; b < FLAT_BINS; b++) extraction += airBins[b]!
  return { extraction, airBins, substrate, trapped, stackAbsorbed, glass }
}
