// The result of a trace: every Monte Carlo figure carries its standard error. Fractions are per launched ray.
// Angles in degrees (edge of the system). Intensities are in 1/sr per launched ray (a Lambertian source of unit
// flux has I(θ) = cosθ/π).
import { z } from 'zod'


export const lossesSchema = z.object({
  reflector: z.number(),
  substrate: z.number(),
  waveguided: z.number(),
  trapped: z.number(),
  unresolved: z.number(),
  /**
   * Thin-film source only: absorbed in the layer stack — traced light that came back down to it and was absorbed
   * there (1 − R_s/R_p), plus the exact share that never left it (evanescent/plasmon modes, absorbed at emission), so
   * that extraction and the losses sum to 1. thinFilm.modes splits it.
   */
  stackAbsorbed: z.number().optional(),
  /**
   * Finite panel only: light in the glass that reached a substrate edge and ended there — absorbed by an absorbing
   * edge, or left through a polished one (then panel.detector.includeEdges may count it as measured).
   */
  edge: z.number().optional(),
})

const perBand = z.array(z.number().nullable())

/**
 * Colour and photometry over viewing angle (a scenario with `emitter.spectrum` only). Polar bands of bandWidthDeg
 * (0–90°), wavelength bins of wavelengthBinNm (380–780 nm). CIE 1931 2° observer; u′v′ = CIE 1976 UCS. Per band a
 * value is null when the band holds no rays. Δu′v′ against the on-axis band (the first). Standard errors by the
 * delta method over the multinomial band × wavelength counts (stdErrMethod says so).
 */
export const colourSchema = z.object({
  bandWidthDeg: z.number(),
  bandCentersDeg: z.array(z.number()),
  x: perBand,
  y: perBand,
  /** σ of x and y per band (delta method, as u′v′); absent in results made before they were recorded. */
  xStdErr: perBand.optional(),
  yStdErr: perBand.optional(),
  uPrime: perBand,
  vPrime: perBand,
  uPrimeStdErr: perBand,
  vPrimeStdErr: perBand,
  deltaUv: perBand,
  deltaUvStdErr: perBand,
  /** Photopic luminance over that of a Lambertian emitter of the same launched luminous flux, per band. */
  photopicRelative: perBand,
  photopicRelativeStdErr: perBand,
  /** Largest Δu′v′ over the bands with centres in 0–60°, with the σ of that band. */
  maxDeltaUvTo60: z.number(),
  maxDeltaUvTo60StdErr: z.number(),
  /** Photopic relative luminance on axis (the on-axis cone, as luminance.onAxisRelative). */
  photopicOnAxisRelative: z.number(),
  photopicOnAxisRelativeStdErr: z.number(),
  /** Luminous efficacy of the extracted radiation: 683 lm/W · ∫V(λ)Φ(λ)dλ / ∫Φ(λ)dλ. */
  luminousEfficacyLmPerW: z.number(),
  luminousEfficacyStdErrLmPerW: z.number(),
  wavelengthBinNm: z.number(),
  wavelengthCentersNm: z.array(z.number()),
  /** Spectra leaving at a few angles (band centres nearest to anglesDeg), each normalised to its own peak = 1. */
  spectra: z.object({ anglesDeg: z.array(z.number()), relative: z.array(z.array(z.number())) }),
  stdErrMethod: z.string(),
})

const modeSplitSchema = z.object({
  /** Fractions of all dipole power (sum 1 with the others of the block). */
  air: z.number(),
  /** Reached the glass but not air: trapped / absorbed in the glass or the film, or lost back in the stack. */
  glass: z.number(),
  waveguided: z.number(),
  evanescent: z.number(),
  /** Absorbed in the stack's layers at emission (before reaching the glass). */
  absorbed: z.number(),
  airStdErr: z.number().optional(),
  glassStdErr: z.number().optional(),
})

const valueWithErr = z.object({ value: z.number(), stdErr: z.number() })

/**
 * A finite panel (`scenario.panel`) only, else null or absent: what the run measured and how, for the device and its
 * traced flat companion (same panel, same detector). `measured.unit` "%": a fraction of the launched light (sphere);
 * "× Lamb.": luminance over that of a Lambertian emitter of the launched flux spread over the emitting area.
 */
export const panelResultSchema = z.object({
  widthMm: z.number(),
  heightMm: z.number(),
  emittingWidthMm: z.number(),
  emittingHeightMm: z.number(),
  edges: z.enum(['absorbing', 'mirrored', 'ground', 'polished']),
  detector: z.object({
    kind: z.enum(['sphere', 'goniometer', 'luminanceMeter']),
    includeEdges: z.boolean().optional(),
    spotCentreMm: z.tuple([z.number(), z.number()]).optional(),
    spotDiameterMm: z.number().optional(),
    /** Acceptance half-angle (deg): the meter's, or the on-axis cone of the goniometer's on-axis figure. */
    acceptanceDeg: z.number(),
  }),
  /** One sentence: what this run measured. */
  measures: z.string(),
  measured: z.object({ value: z.number(), stdErr: z.number(), unit: z.enum(['%', '× Lamb.']) }),
  planarMeasured: valueWithErr,
  /** measured over planarMeasured, σ as for `enhancement` (independent streams); null while the flat device reads 0. */
  gain: z.object({ value: z.number().nullable(), stdErr: z.number().nullable() }),
  /** Fraction of launched rays that ended at an edge (losses.edge), device and companion. */
  edge: valueWithErr,
  planarEdge: valueWithErr,
  /**
   * Goniometer and luminance meter: the spot (field stop) over the emitting area (π r²/(w·h)); the light leaving the
   * front face inside the spot as a fraction of the launched light, and by 1° polar bin as intensity (1/sr per
   * launched ray) and luminance relative to a Lambertian of the launched flux over the emitting area.
   */
  spot: z.object({
    areaFraction: z.number(),
    extraction: z.number(),
    extractionStdErr: z.number(),
    perSteradian: z.array(z.number()),
    perSteradianStdErr: z.array(z.number()),
    luminanceRelative: z.array(z.number()),
    luminanceRelativeStdErr: z.array(z.number()),
    planarLuminanceRelative: z.array(z.number()),
    planarLuminanceRelativeStdErr: z.array(z.number()),
  }).nullable(),
})

/**
 * Thin-film source (`emitter.thinFilm`) only. `extraction` is then the fraction of all dipole power that reaches
 * air (outcoupling efficiency). The flat split is exact (quadrature, glass incoherent); the film split is traced.
 */
export const thinFilmResultSchema = z.object({
  /** The wavelength F, q_eff, the dissipation spectrum and the glass emission are given at (the spectrum's peak, or 550 nm). */
  wavelengthNm: z.number(),
  purcellFactor: z.number(),
  /** q·F/(1 − q + q·F). */
  effectiveRadiativeEfficiency: z.number(),
  horizontalDipoleFraction: z.number(),
  /** Over the whole spectrum, weighted as the traced rays are (spectrum × Purcell factor per wavelength). */
  modes: z.object({ flat: modeSplitSchema, film: modeSplitSchema }),
  /**
   * Power dissipation spectra K(u) at wavelengthNm, u = in-plane wavevector / k in the emitting layer, normalised
   * so a dipole in the infinite emitting medium gives 1; mixed = Θ·(TE,h + TM,h) + (1 − Θ)·TM,v.
   * uGlass = n_glass/n_e and uAir = 1/n_e mark the region boundaries (with u = 1).
   */
  dissipation: z.object({
    u: z.array(z.number()),
    teHorizontal: z.array(z.number()),
    tmHorizontal: z.array(z.number()),
    tmVertical: z.array(z.number()),
    mixed: z.array(z.number()),
    uAir: z.number(),
    uGlass: z.number(),
  }),
  /** Power into the glass per steradian per unit dipole power, by polar angle in the glass, s and p. */
  glassEmission: z.object({ thetaDeg: z.array(z.number()), s: z.array(z.number()), p: z.array(z.number()) }),
})

export const resultSchema = z.object({
  rays: z.number().int(),
  seed: z.number().int(),
  /** Fresnel mode of the trace ("averaged", "polarized" or "none"); absent in results stored before it was recorded. */
  fresnel: z.enum(['averaged', 'none', 'polarized']).optional(),
  /** Fraction of launched rays that leave into air. */
  extraction: z.number(),
  /** Binomial standard error √(η(1−η)/N). */
  extractionStdErr: z.number(),
  losses: lossesSchema,
  lossesStdErr: lossesSchema,
  intensity: z.object({
    /** Lower edges of the polar bins (deg); 90 bins of 1°. */
    thetaBinWidthDeg: z.number(),
    thetaCentersDeg: z.array(z.number()),
    /** Azimuth-averaged intensity in air, 1/sr per launched ray: count/(N·2π(cosθa − cosθb)). */
    perSteradian: z.array(z.number()),
    perSteradianStdErr: z.array(z.number()),
    /** θ–φ map, row-major [thetaBin * phiBins + phiBin], 1/sr per launched ray; φ measured from +x. */
    map: z.object({
      thetaBins: z.number().int(),
      phiBins: z.number().int(),
      phiBinWidthDeg: z.number(),
      perSteradian: z.array(z.number()),
      perSteradianStdErr: z.array(z.number()),
    }),
  }),
  luminance: z.object({
    /** L(θ)/L_Lambertian of the same (launched) flux: π·I(θ)/cosθ, at the bin centres. */
    relative: z.array(z.number()),
    relativeStdErr: z.array(z.number()),
    /** Relative luminance on axis, estimated over the cone θ < onAxisConeDeg. */
    onAxisRelative: z.number(),
    onAxisRelativeStdErr: z.number(),
    onAxisConeDeg: z.number(),
    /**
     * Angle where luminance first falls to half its on-axis value (deg), luminance pooled over a sliding 5° window
     * against noise, linear between window centres; null if it never does before 87.5°.
     */
    halfLuminanceAngleDeg: z.number().nullable(),
    /** Its standard error (delta method from the window counts and the on-axis estimate); null with it. */
    halfLuminanceAngleStdErrDeg: z.number().nullable(),
    /** Reciprocal (backward-traced) luminance at chosen viewing directions, L/L_Lambertian with σ; absent if not asked. */
    directions: z
      .array(z.object({ thetaDeg: z.number(), phiDeg: z.number(), relative: z.number(), relativeStdErr: z.number() }))
      .optional(),
  }),
  /** The planar companion (the same stack without lenses, traced in the same run); for a planar device, itself. */
  planar: z.object({
    /** How the companion was computed: by quadrature of the flat stack (exact, no rays) or traced; absent = traced. */
    method: z.enum(['quadrature', 'traced']).optional(),
    extraction: z.number(),
    extractionStdErr: z.number(),
    losses: lossesSchema,
    /** Its azimuth-averaged intensity in air per 1° bin, 1/sr per launched ray, with σ (as intensity.perSteradian). */
    perSteradian: z.array(z.number()),
    perSteradianStdErr: z.array(z.number()),
    /** Its luminance relative to a Lambertian of the launched flux per 1° bin, with σ (as luminance.relative). */
    luminanceRelative: z.array(z.number()),
    luminanceRelativeStdErr: z.array(z.number()),
  }),
  /**
   * Finite pixel (disc or rectangle source) only, else null: light that leaves the device inside the pixel's
   * footprint (lateral position where the ray leaves the last surface), as a luminance meter focused on the pixel
   * sees it. onAxisRelative: fraction of launched rays leaving inside the footprint within θ < 5°, over a
   * Lambertian's sin²5°; onAxisEnhancement: device over planar companion (σ as for `enhancement`).
   */
  pixel: z
    .object({
      extraction: z.number(),
      extractionStdErr: z.number(),
      onAxisRelative: z.number(),
      onAxisRelativeStdErr: z.number(),
      planarOnAxisRelative: z.number(),
      planarOnAxisRelativeStdErr: z.number(),
      onAxisEnhancement: z.number(),
      onAxisEnhancementStdErr: z.number(),
    })
    .nullable(),
  /** extraction / planar.extraction; σ from (σE/E)² = (σ1/η1)² + (σ2/η2)² (independent streams). */
  enhancement: z.number(),
  enhancementStdErr: z.number(),
  /** Colour over angle (with `emitter.spectrum`), else absent or null; the planar companion's is planarColour. */
  colour: colourSchema.nullable().optional(),
  planarColour: colourSchema.nullable().optional(),
  /** colour.photopicOnAxisRelative over planarColour's (with a spectrum), σ as for `enhancement`. */
  photopicOnAxisGain: z.number().nullable().optional(),
  photopicOnAxisGainStdErr: z.number().nullable().optional(),
  /** Thin-film source only. */
  thinFilm: thinFilmResultSchema.nullable().optional(),
  /** Finite panel only: the detector's reading (absent or null: the infinite array, all light into air per launched ray). */
  panel: panelResultSchema.nullable().optional(),
})

export type TraceResult = z.infer<typeof resultSchema>
export type ColourResult = z.infer<typeof colourSchema>
export type ThinFilmResult = z.infer<typeof thinFilmResultSchema>
export type Losses = z.infer<typeof lossesSchema>
export type PanelResult = z.infer<typeof panelResultSchema>
