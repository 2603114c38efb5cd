// Upload query of a measurement table (the body is the CSV itself).
import { z } from 'zod'
import { stripBidiControls } from './limits'

export const dataTableKindSchema = z.enum(['lens_profile', 'angular_profile', 'refractive_index'], {
  error: 'kind must be one of lens_profile (r_um, height_um), angular_profile (theta_deg, intensity), refractive_index (wavelength_nm, n, k)',
})

export const dataTableUploadQuerySchema = z.object({
  kind: dataTableKindSchema,
  name: z.string({ error: 'name is required' }).overwrite(stripBidiControls).trim().min(1, { error: 'name must not be empty' }).max(120, { error: 'name must be at most 120 characters' }),
  fileName: z.string({ error: 'fileName is required (the name of the uploaded file)' }).max(400),
})
