// Geometry as shown (never as stored): lengths to 0.01 µm, the step a lens-film line can make and a stylus
// profiler can check (common practice for replicated micro-optics, from memory); unitless ratios (fill factor,
// aspect ratio, conic constant) to 3 significant digits; angles to 0.1°. The digits are kept ("10.00 µm",
// "0.500"), so every value says how fine it is and columns line up. Stored and exported values keep full precision.

/** The displayed length step, µm. */
export const LENGTH_STEP_UM = 0.01

function fixed(value: number, decimals: number): string {
  const s = value.toFixed(decimals)
  return /^-0\.?0*$/.test(s) ? s.slice(1) : s
}

/** A length to 0.01 µm: 4.392779 → "4.39 µm" (withUnit false → "4.39"). */
export function lengthUm(value: number | null | undefined, withUnit = true): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—'
  const s = fixed(value, 2)
  return withUnit ? `${s} µm` : s
}

/** A unitless ratio to 3 significant digits: 0.906899 → "0.907", 12.345 → "12.3", 0.5 → "0.500". */
export function ratio(value: number | null | undefined): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—'
  if (value === 0) return '0'
  if (Math.abs(value) >= 1000) return String(Math.round(value))
  const s = value.toPrecision(3)
  return /^-0\.?0*$/.test(s) ? s.slice(1) : s
}

/** An angle to 0.1°: 53.1301 → "53.1°". */
export function angleDeg(value: number | null | undefined, withUnit = true): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—'
  const s = fixed(value, 1)
  return withUnit ? `${s}°` : s
}

/**
 * A geometry value by its unit, as the lines above round it: 'µm' → 0.01 µm, '°' → 0.1°, '' (a ratio) → 3
 * significant digits; any other unit falls back to 4 significant figures. withUnit false leaves the unit to a column header.
 */
export function geometry(value: number | null | undefined, unit: string, withUnit = true): string {
  if (unit === 'µm') return lengthUm(value, withUnit)
  if (unit === '°') return angleDeg(value, withUnit)
  if (unit === '' || unit === '1') return ratio(value)
  return sig4(value, withUnit ? unit : '')
}

/**
 * A sweep coordinate of the axis `parameter` (unit from AXIS_PARAMETERS): lengths and the fill factor are geometry
 * and round as above; other unitless axes (indices, reflectance) keep 4 significant digits, since an index
 * such as 1.517 is a material's value, not a line tolerance.
 */
export function axisValue(parameter: string, value: number | null | undefined, unit: string, withUnit = true): string {
  if (unit === 'µm' || parameter === 'lensArray.fillFactor' || parameter === 'lensArray.conicConstant') return geometry(value, unit, withUnit)
  return sig4(value, withUnit ? unit : '')
}

/** 4 significant figures with the unit, trailing zeros dropped (as app/utils/format.ts rounds plain values). */
function sig4(value: number | null | undefined, unit: string): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—'
  const s = String(Number(value.toPrecision(4)))
  return unit ? (unit === '°' ? `${s}°` : `${s} ${unit}`) : s
}
