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
