// Dates and counts for display. Figures with σ and plain values with units: shared/utils/format.ts (withErr,
// pctErr, num), the same rule on the server.

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
