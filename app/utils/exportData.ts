// Client-side export: CSV text from rows (RFC 4180 quoting) and a download of a string or data URL.
import { fileName, fileNamePart } from '#shared/utils/file-name'

export function toCsv(header: string[], rows: Array<Array<string | number | null | undefined>>): string {
  const cell = (v: string | number | null | undefined) => {
    if (v === null || v === undefined) return ''
    const s = typeof v === 'number' ? (Number.isFinite(v) ? String(v) : '') : v
    return /[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s
  }
  return [header, ...rows].map((r) => r.map(cell).join(',')).join('\r\n') + '\r\n'
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
