// Number display, the one rule for app pages, exports and mails: a Monte Carlo figure with its standard error,
// both rounded to the σ's second significant digit (common practice for Monte Carlo estimates), and the unit;
// plain values to 4 significant figures. Every caller passes the unit ('' for a ratio shown as such, '%' for
// percent, '°' written without a space).

/** Decimal places that show σ to two significant digits (4 when there is no σ; at most 8). */
export function sigmaDecimals(stdErr: number | null | undefined): number {
  if (stdErr === null || stdErr === undefined || !(stdErr > 0) || !Number.isFinite(stdErr)) return 4
  return Math.max(0, Math.min(8, 1 - Math.floor(Math.log10(stdErr))))
}

function unitSuffix(unit: string): string {
  return unit ? (unit === '°' ? '°' : ` ${unit}`) : ''
}

/** "0.4123 ± 0.0011", "1.988 ± 0.030 ×", "53.13 ± 0.40°" (value and σ in the same units). */
export function withErr(value: number | null | undefined, stdErr: number | null | undefined, unit = ''): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—'
  const e = stdErr ?? 0
  const dp = sigmaDecimals(e)
  return `${value.toFixed(dp)} ± ${e.toFixed(dp)}${unitSuffix(unit)}`
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
  return `${s}${unitSuffix(unit)}`
}
