// File names for exports: ASCII only, yet keeping what the name says. Units and symbols are spelled out the way
// engineers write them in file names (µm → um, θ → theta, φ → phi, × → x, ° → deg, σ → sigma, ± → pm, ≤ → le,
// ≥ → ge), every other run of characters outside [A-Za-z0-9._-] becomes one "-", accents are dropped.
const SPELLED: Array<[RegExp, string]> = [
  [/[µμ]/g, 'u'], [/[θΘ]/g, 'theta'], [/[φϕΦ]/g, 'phi'], [/×/g, 'x'], [/°/g, 'deg'], [/[σΣ]/g, 'sigma'],
  [/±/g, 'pm'], [/≤/g, 'le'], [/≥/g, 'ge'], [/[λ]/g, 'lambda'], [/²/g, '2'], [/³/g, '3'], [/½/g, '1-2'],
  [/[–—−]/g, '-'], [/·/g, '-'],
]

/** "Hex hemispheres, 10 µm" → "Hex-hemispheres-10um"; "θ–φ map" → "theta-phi-map". Never empty. */
export function fileNamePart(s: string, maxLength = 80): string {
  let out = s
  for (const [re, to] of SPELLED) out = out.replace(re, to)
  // a number and its unit stay together: "10 um" → "10um"
  out = out.replace(/(\d)\s+(um|nm|mm|deg)\b/g, '$1$2')
  out = out.normalize('NFKD').replace(/[\u0300-\u036f]/g, '')
  out = out.replace(/[^A-Za-z0-9._]+/g, '-').replace(/-{2,}/g, '-').replace(/^[-.]+|[-.]+$/g, '')
  return out.slice(0, maxLength).replace(/-+$/, '') || 'lensfield'
}

/** Parts joined with "_" (each part keeps its own "-"): "TL-40-run_cell3_theta-phi-map". */
export function fileName(...parts: string[]): string {
  return parts.map((p) => fileNamePart(p)).join('_').slice(0, 160)
}
