// Upload query of a measurement table (the body is the CSV itself).
import { z } from 'zod'
import { stripBidiControls } from './limits'

export const dataTableKindSchema = z.enum(['lens_profile', 'angular_profile', 'refractive_index', 'emission_spectrum'], {
  error: 'kind must be one of lens_profile (r_um, height_um), angular_profile (theta_deg, intensity), refractive_index (wavelength_nm, n, k), emission_spectrum (wavelength_nm, intensity)',
})

export const dataTableUploadQuerySchema = z.object({
  kind: dataTableKindSchema,
  name: z.string({ error: 'name is required' }).overwrite(stripBidiControls).trim().min(1, { error: 'name must not be empty' }).max(120, { error: 'name must be at most 120 characters' }),
  fileName: z.string({ error: 'fileName is required (the name of the uploaded file)' }).max(400),
  /** Lens profiles only: fit the stylus trace before storing (shared/utils/profile-fit.ts); the raw rows are kept. */
  fit: z.enum(['none', 'isotonic', 'asphere'], { error: 'fit must be none, isotonic (smoothing + monotone fit) or asphere (conic/even-asphere least squares)' }).default('none'),
  smoothPoints: z.coerce.number({ error: 'smoothPoints must be a whole number of points' }).int({ error: 'smoothPoints must be a whole number of points' })
    .min(1, { error: 'smoothPoints must be at least 1 (no smoothing)' }).max(51, { error: 'smoothPoints must be at most 51 points' })
    .refine((v) => v % 2 === 1, { error: 'smoothPoints must be odd (a centred window)' }).default(5),
  asphereTerms: z.coerce.number({ error: 'asphereTerms must be 0, 1, 2 or 3' }).int({ error: 'asphereTerms must be 0, 1, 2 or 3' })
    .min(0, { error: 'asphereTerms must be 0, 1, 2 or 3' }).max(3, { error: 'asphereTerms must be 0 (conic only), 1, 2 or 3 (up to r⁸)' }).default(0),
})
