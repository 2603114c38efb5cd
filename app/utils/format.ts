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

// Geometry as shown (lengths to 0.01 µm, ratios to 3 significant digits, angles to 0.1°): lengthUm, ratio, angleDeg,
// geometry and axisValue live in shared/utils/geometry-format.ts (auto-imported here too), so the server's messages
// round the same way.
