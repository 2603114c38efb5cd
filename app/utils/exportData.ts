// Client-side export: CSV text from rows, written by papaparse with the cell rules of shared/utils/csv-cell.ts
// (text always quoted, line breaks folded, formula starts neutralised; numbers bare; non-finite numbers empty), and a
// download of a string or data URL.
import Papa from 'papaparse'
import { safeCsvText, type CsvValue } from '#shared/utils/csv-cell'
import { fileName, fileNamePart } from '#shared/utils/file-name'

function cell(v: CsvValue): string | number | null {
  if (v === null || v === undefined) return null
  if (typeof v === 'number') return Number.isFinite(v) ? v : null
  return safeCsvText(v)
}

export function toCsv(header: string[], rows: CsvValue[][]): string {
  const data = [header, ...rows].map((r) => r.map(cell))
  // escapeFormulae stays off: safeCsvText has already neutralised text, and papaparse's own rule would also
  // prefix negative numbers.
  return Papa.unparse(data, { quotes: (value: unknown) => typeof value === 'string', newline: '\r\n', escapeFormulae: false }) + '\r\n'
}

export function downloadHref(href: string, filename: string): void {
  const a = document.createElement('a')
  a.href = href
  a.download = filename
  document.body.appendChild(a)
  a.click()
  a.remove()
}

export function downloadText(text: string, filename: string, type = 'text/csv'): void {
  const url = URL.createObjectURL(new Blob([text], { type }))
  downloadHref(url, filename)
  setTimeout(() => URL.revokeObjectURL(url), 1000)
}

/** A file-name-safe form of a title that keeps units and symbols (10 µm → 10um, θ–φ → theta-phi). */
export function slug(s: string): string {
  return fileNamePart(s, 60)
}

/** Export file name: the run's name, then what it is ("TL-run_cell-3_Intensity-in-air"). */
export { fileName }

/** One row of a colour trajectory: a 2° band's centre and its chromaticity, Δu′v′ against on axis, photopic luminance. */
export interface ColourTrajectoryRow {
  angleDeg: number
  x: number | null; xStdErr: number | null; y: number | null; yStdErr: number | null
  uPrime: number | null; uPrimeStdErr: number | null
  vPrime: number | null; vPrimeStdErr: number | null
  deltaUv: number | null; deltaUvStdErr: number | null
  photopicRelative: number | null; photopicRelativeStdErr: number | null
}

interface ColourBands {
  bandCentersDeg: number[]
  x: Array<number | null>; y: Array<number | null>
  xStdErr?: Array<number | null>; yStdErr?: Array<number | null>
  uPrime: Array<number | null>; uPrimeStdErr: Array<number | null>
  vPrime: Array<number | null>; vPrimeStdErr: Array<number | null>
  deltaUv: Array<number | null>; deltaUvStdErr: Array<number | null>
  photopicRelative: Array<number | null>; photopicRelativeStdErr: Array<number | null>
}

/**
 * The colour trajectory of a result's `colour` (or `planarColour`): bands with centres up to `toDeg`, every
 * `everyBands`-th band from the on-axis one (1 = every 2° band).
 */
export function colourTrajectory(c: ColourBands, toDeg = 80, everyBands = 1): ColourTrajectoryRow[] {
  const out: ColourTrajectoryRow[] = []
  c.bandCentersDeg.forEach((angleDeg, b) => {
    if (angleDeg > toDeg || b % everyBands !== 0) return
    out.push({
      angleDeg, x: c.x[b] ?? null, xStdErr: c.xStdErr?.[b] ?? null, y: c.y[b] ?? null, yStdErr: c.yStdErr?.[b] ?? null,
      uPrime: c.uPrime[b] ?? null, uPrimeStdErr: c.uPrimeStdErr[b] ?? null, vPrime: c.vPrime[b] ?? null, vPrimeStdErr: c.vPrimeStdErr[b] ?? null,
      deltaUv: c.deltaUv[b] ?? null, deltaUvStdErr: c.deltaUvStdErr[b] ?? null,
      photopicRelative: c.photopicRelative[b] ?? null, photopicRelativeStdErr: c.photopicRelativeStdErr[b] ?? null,
    })
  })
  return out
}

export const COLOUR_CSV_HEADER = ['device', 'band_centre_deg', 'x', 'x_std_err', 'y', 'y_std_err', 'u_prime', 'u_prime_std_err', 'v_prime', 'v_prime_std_err',
  'delta_uv', 'delta_uv_std_err', 'photopic_luminance_relative', 'photopic_luminance_relative_std_err']

/** CSV of the colour per 2° band of the device and its flat companion (σ columns: one standard error). */
export function colourCsv(device: ColourBands, planar: ColourBands | null): string {
  const rows: CsvValue[][] = []
  for (const [name, c] of [['device', device], ['flat', planar]] as const) {
    if (!c) continue
    for (const r of colourTrajectory(c, 90)) {
      rows.push([
        name, r.angleDeg, r.x, r.xStdErr, r.y, r.yStdErr, r.uPrime, r.uPrimeStdErr, r.vPrime, r.vPrimeStdErr, r.deltaUv, r.deltaUvStdErr,
        r.photopicRelative, r.photopicRelativeStdErr,
      ])
    }
  }
  return toCsv(COLOUR_CSV_HEADER, rows)
}
