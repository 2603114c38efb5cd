// Client-side export: CSV text from rows (shared/utils/csv-cell.ts: text quoted, formula starts neutralised) and a
// download of a string or data URL.
import { csvRow, type CsvValue } from '#shared/utils/csv-cell'
import { fileName, fileNamePart } from '#shared/utils/file-name'

export function toCsv(header: string[], rows: CsvValue[][]): string {
  return [header, ...rows].map(csvRow).join('\r\n') + '\r\n'
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
