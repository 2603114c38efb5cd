// Sweep-grid helpers for the result page: the paired-noise test for the best cell, the derived geometry of each
// cell (sag, diameter) and a label colour that stays readable on every colour of the heat-map ramp.
import { HEAT_RAMP, PALETTE } from './palette'


/** A cell's figure with its standard error (same units). */
export interface CellFigure { cellIndex: number; value: number; stdErr: number }

/**
 * Cells whose figure cannot be told apart from the best one: |best − other| < k·σ_diff with
 * σ_diff = √(σ_best² + σ_other²). Each cell of a sweep is traced with its own seed, so the two estimates are
 * independent and their variances add (difference of independent estimates; any statistics text, e.g. Bevington &
 * Robinson, "Data Reduction and Error Analysis", ch. 3). k = 2 by default.
 */
export function withinNoiseOfBest(best: CellFigure, others: CellFigure[], k = 2): CellFigure[] {
  return others.filter((o) => o.cellIndex !== best.cellIndex
    && Math.abs(best.value - o.value) < k * Math.sqrt(best.stdErr ** 2 + o.stdErr ** 2))
}

/** Heat-map ramp, light to dark (lagoon tints of the palette). */
const INK = PALETTE.ink.DEFAULT
const PAPER = PALETTE.paper.raised

function rgb(hex: string): [number, number, number] {
  const n = Number.parseInt(hex.slice(1), 16)
  return [(n >> 16) & 255, (n >> 8) & 255, n & 255]
}

/** WCAG 2.x relative luminance of an sRGB colour (W3C, "Web Content Accessibility Guidelines 2.1", §1.4.3 notes). */
export function relativeLuminance(hex: string): number {
  const [r, g, b] = rgb(hex).map((c) => {
    const s = c / 255
    return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4
  }) as [number, number, number]
  return 0.2126 * r + 0.7152 * g + 0.0722 * b
}

/** WCAG contrast ratio (L1 + 0.05)/(L2 + 0.05), lighter over darker. */
export function contrastRatio(a: string, b: string): number {
  const la = relativeLuminance(a), lb = relativeLuminance(b)
  return (Math.max(la, lb) + 0.05) / (Math.min(la, lb) + 0.05)
}

/** The ramp's colour at t ∈ [0, 1] (linear between stops, as the chart's visual map interpolates). */
export function rampColour(t: number, ramp: readonly string[] = HEAT_RAMP): string {
  const x = Math.min(1, Math.max(0, Number.isFinite(t) ? t : 0)) * (ramp.length - 1)
  const i = Math.min(ramp.length - 2, Math.floor(x))
  const f = x - i
  const a = rgb(ramp[i]!), b = rgb(ramp[i + 1]!)
  const c = a.map((v, j) => Math.round(v + (b[j]! - v) * f))
  return `#${c.map((v) => v.toString(16).padStart(2, '0')).join('')}`
}

/** Ink or white, whichever contrasts more with the cell colour at t. */
export function labelColour(t: number, ramp: readonly string[] = HEAT_RAMP): string {
  const bg = rampColour(t, ramp)
  return contrastRatio(bg, INK) >= contrastRatio(bg, PAPER) ? INK : PAPER
}
