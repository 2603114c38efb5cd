// An emission spectrum as shown in a result's settings (shared/types/scenario.ts spectrumSchema; a design's
// reference to an uploaded table is resolved to rows before a run stores it).
export function describeSpectrum(sp: unknown): string {
  if (sp === undefined || sp === null) return 'none (550 nm line, no colour figures)'
  const s = sp as { wavelengthNm?: number; peakNm?: number; fwhmNm?: number; table?: number[][]; tableId?: string }
  if (s.wavelengthNm !== undefined) return `line at ${s.wavelengthNm} nm`
  if (s.peakNm !== undefined) return `Gaussian, peak ${s.peakNm} nm, FWHM ${s.fwhmNm} nm`
  if (s.table) return `table of ${s.table.length} rows, ${s.table[0]![0]}–${s.table[s.table.length - 1]![0]} nm`
  return 'uploaded table'
}
