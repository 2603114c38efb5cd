// Client-side export: CSV text from rows (shared/utils/csv-cell.ts: text quoted, formula starts neutralised) and a
// download of a string or data URL.
import { csvRow, type CsvValue } from '#shared/utils/csv-cell'

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

/** A file-name-safe slug of a title. */
export function slug(s: string): string {
  return s.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '').slice(0, 60) || 'lensfield'
}
