// Query contracts of the export routes.
import { z } from 'zod'

export const resultExportQuerySchema = z.object({
  format: z.enum(['csv', 'json'], { error: 'format must be csv or json' }).default('csv'),
})

export const surfaceExportQuerySchema = z.object({
  format: z.enum(['stl', 'sag'], { error: 'format must be stl (binary STL patch) or sag (radial sag table CSV)' }).default('stl'),
  lensesX: z.coerce.number().int().min(1, { error: 'lensesX must be at least 1' }).max(500, { error: 'lensesX must be at most 500' }).default(10),
  lensesY: z.coerce.number().int().min(1, { error: 'lensesY must be at least 1' }).max(500, { error: 'lensesY must be at most 500' }).default(10),
  samplesPerPitch: z.coerce.number().int().min(4, { error: 'samplesPerPitch must be at least 4' }).max(400, { error: 'samplesPerPitch must be at most 400' }).default(32),
  points: z.coerce.number().int().min(2, { error: 'points must be at least 2' }).max(100_000, { error: 'points must be at most 100000' }).default(201),
})
