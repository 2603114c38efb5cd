// The result of a trace: every Monte Carlo figure carries its standard error. Fractions are per launched ray.
// Angles in degrees (edge of the system). Intensities are in 1/sr per launched ray (a Lambertian source of unit
// flux has I(θ) = cosθ/π).
import { z } from 'zod'

const fractionWithErr = z.object({ value: z.number(), stdErr: z.number() })

export const lossesSchema = z.object({
  reflector: z.number(),
  substrate: z.number(),
  waveguided: z.number(),
  trapped: z.number(),
  unresolved: z.number(),
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
  }),
  /** The planar companion (the same stack without lenses, traced in the same run); for a planar device, itself. */
  planar: z.object({
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
})

export type TraceResult = z.infer<typeof resultSchema>
export type Losses = z.infer<typeof lossesSchema>
export { fractionWithErr }
