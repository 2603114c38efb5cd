// Number display: a Monte Carlo figure with its standard error, rounded to the σ's leading digits; plain values to
// 4 significant figures. Every caller passes the unit ('' for a ratio/fraction shown as such, '%' for percent).

/** Decimal places that show σ to two significant digits. */
function decimalsFor(stdErr: number): number {
  if (!(stdErr > 0) || !Number.isFinite(stdErr)) return 4
  return Math.max(0, Math.min(8, 1 - Math.floor(Math.log10(stdErr))))
}

/** "0.4123 ± 0.0011" (value and σ in the same units). */
export function withErr(value: number | null | undefined, stdErr: number | null | undefined, unit = ''): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—'
  const e = stdErr ?? 0
  const dp = decimalsFor(e)
  const u = unit ? (unit === '°' ? '°' : ` ${unit}`) : ''
  return `${value.toFixed(dp)} ± ${e.toFixed(dp)}${u}`
}

/** A fraction as a percentage with σ: 0.4123, 0.0011 → "41.23 ± 0.11 %". */
export function pctErr(value: number | null | undefined, stdErr: number | null | undefined): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—'
  return withErr(value * 100, (stdErr ?? 0) * 100, '%')
}

/** 4 significant figures with the unit: 6.25, 'µm' → "6.25 µm". */
export function num(value: number | null | undefined, unit = '', digits = 4): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—'
  const s = String(Number(value.toPrecision(digits)))
  return unit ? (unit === '°' ? `${s}°` : `${s} ${unit}`) : s
}

export function rays(n: number): string {
  return new Intl.NumberFormat('en-GB').format(Math.round(n))
}

/**
 * A date and time in the reader's locale (medium date, short time), e.g. "2 Dec 2026, 13:05" in en-GB. Without a
 * locale (server rendering, first paint) it uses en-GB so server and browser agree until the page is mounted.
 */
export function dateTime(at: string | Date | null | undefined, locale?: string, withTime = true): string {
  if (at === null || at === undefined) return '—'
  const d = at instanceof Date ? at : new Date(at)
  if (Number.isNaN(d.getTime())) return '—'
  return new Intl.DateTimeFormat(locale ?? 'en-GB', withTime ? { dateStyle: 'medium', timeStyle: 'short' } : { dateStyle: 'medium' }).format(d)
}

/** The ISO 8601 UTC time for a tooltip: "2026-12-02T13:05:00.000Z". */
export function isoTime(at: string | Date | null | undefined): string {
  if (at === null || at === undefined) return ''
  const d = at instanceof Date ? at : new Date(at)
  return Number.isNaN(d.getTime()) ? '' : d.toISOString()
}

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
 * significant digits; any other unit falls back to num(). withUnit false leaves the unit to a column header.
 */
export function geometry(value: number | null | undefined, unit: string, withUnit = true): string {
  if (unit === 'µm') return lengthUm(value, withUnit)
  if (unit === '°') return angleDeg(value, withUnit)
  if (unit === '' || unit === '1') return ratio(value)
  return withUnit ? num(value, unit) : num(value)
}

/**
 * A sweep coordinate of the axis `parameter` (unit from AXIS_PARAMETERS): lengths and the fill factor are geometry
 * and round as above; other unitless axes (indices, reflectance) keep num()'s 4 significant digits, since an index
 * such as 1.517 is a material's value, not a line tolerance.
 */
export function axisValue(parameter: string, value: number | null | undefined, unit: string, withUnit = true): string {
  if (unit === 'µm' || parameter === 'lensArray.fillFactor' || parameter === 'lensArray.conicConstant') return geometry(value, unit, withUnit)
  return withUnit ? num(value, unit) : num(value)
}
