// Figures of merit a sweep ranks its cells by, one entry each: what it is called, its unit, which way is better,
// what a design needs for it to exist, and how to read it (value and σ) from a cell's stored summary. A new figure
// is one entry here; the server's ranking, the sweep-finished mail, the sweep page and the start panel read it.
import { z } from 'zod'
import type { TraceResult } from './result'
import type { Scenario } from './scenario'

/**
 * The compact figures kept beside a cell's counts for lists, maps and ranking (no arrays). Every figure carries its
 * standard error. The optional fields are absent in summaries stored before they existed, and null when the design
 * does not produce them (pixel figures need a finite source, colour figures an emission spectrum).
 */
export const cellSummarySchema = z.object({
  rays: z.number(),
  extraction: z.number(),
  extractionStdErr: z.number(),
  enhancement: z.number(),
  enhancementStdErr: z.number(),
  planarExtraction: z.number(),
  planarExtractionStdErr: z.number(),
  onAxisLuminance: z.number(),
  onAxisLuminanceStdErr: z.number(),
  halfLuminanceAngleDeg: z.number().nullable(),
  pixelOnAxisGain: z.number().nullable().optional(),
  pixelOnAxisGainStdErr: z.number().nullable().optional(),
  /** Largest Δu′v′ from the on-axis colour up to 60° (with `emitter.spectrum`). */
  maxDeltaUvTo60: z.number().nullable().optional(),
  maxDeltaUvTo60StdErr: z.number().nullable().optional(),
  /** Photopic on-axis luminance over the planar companion's (with `emitter.spectrum`). */
  photopicOnAxisGain: z.number().nullable().optional(),
  photopicOnAxisGainStdErr: z.number().nullable().optional(),
  /** Finite panel: the detector's reading over the flat device's (same panel, same detector), and the edge share. */
  measuredGain: z.number().nullable().optional(),
  measuredGainStdErr: z.number().nullable().optional(),
  edgeLoss: z.number().nullable().optional(),
  edgeLossStdErr: z.number().nullable().optional(),
  losses: z.record(z.string(), z.number()),
  lossesStdErr: z.record(z.string(), z.number()),
})
export type CellSummary = z.infer<typeof cellSummarySchema>

/** The summary of a full result, as stored on the cell. */
export function cellSummaryOf(r: TraceResult): CellSummary {
  return {
    rays: r.rays,
    extraction: r.extraction,
    extractionStdErr: r.extractionStdErr,
    enhancement: r.enhancement,
    enhancementStdErr: r.enhancementStdErr,
    planarExtraction: r.planar.extraction,
    planarExtractionStdErr: r.planar.extractionStdErr,
    onAxisLuminance: r.luminance.onAxisRelative,
    onAxisLuminanceStdErr: r.luminance.onAxisRelativeStdErr,
    halfLuminanceAngleDeg: r.luminance.halfLuminanceAngleDeg,
    pixelOnAxisGain: r.pixel ? r.pixel.onAxisEnhancement : null,
    pixelOnAxisGainStdErr: r.pixel ? r.pixel.onAxisEnhancementStdErr : null,
    // colour figures only where the result has them, so summaries of monochrome runs stay as they were
    ...(r.colour ? { maxDeltaUvTo60: r.colour.maxDeltaUvTo60, maxDeltaUvTo60StdErr: r.colour.maxDeltaUvTo60StdErr } : {}),
    ...(r.photopicOnAxisGain !== undefined && r.photopicOnAxisGain !== null
      ? { photopicOnAxisGain: r.photopicOnAxisGain, photopicOnAxisGainStdErr: r.photopicOnAxisGainStdErr ?? null } : {}),
    // panel figures only for a finite panel, so summaries of infinite-array runs stay as they were
    ...(r.panel ? {
      measuredGain: r.panel.gain.value, measuredGainStdErr: r.panel.gain.stdErr, edgeLoss: r.panel.edge.value, edgeLossStdErr: r.panel.edge.stdErr,
    } : {}),
    losses: r.losses,
    lossesStdErr: r.lossesStdErr,
  }
}

export interface FigureValue { value: number; stdErr: number }

/** What a design must have for a figure to exist: a finite (disc or rectangle) source, an emission spectrum, a finite panel. */
export type FigureNeed = 'pixel-source' | 'spectrum' | 'panel'

export interface FigureDefinition {
  /** As the page names it ("Gain over the flat device"). */
  label: string
  /** In a sentence ("enhancement"): mails, notes. */
  phrase: string
  /** Unit shown after the number; '%' figures are stored as fractions and shown × 100. */
  unit: '×' | '%' | '× Lamb.' | ''
  better: 'higher' | 'lower'
  needs: FigureNeed | null
  read: (s: CellSummary) => FigureValue | null
}

function pair(value: number | null | undefined, stdErr: number | null | undefined): FigureValue | null {
  return value === null || value === undefined ? null : { value, stdErr: stdErr ?? 0 }
}

export const FIGURES = {
  enhancement: {
    label: 'Gain over the flat device', phrase: 'enhancement', unit: '×', better: 'higher', needs: null,
    read: (s) => pair(s.enhancement, s.enhancementStdErr),
  },
  extraction: {
    label: 'Extraction into air', phrase: 'extraction', unit: '%', better: 'higher', needs: null,
    read: (s) => pair(s.extraction, s.extractionStdErr),
  },
  onAxisLuminance: {
    label: 'On-axis luminance', phrase: 'on-axis luminance', unit: '× Lamb.', better: 'higher', needs: null,
    read: (s) => pair(s.onAxisLuminance, s.onAxisLuminanceStdErr),
  },
  pixelOnAxisGain: {
    label: 'On-axis gain over the pixel', phrase: 'on-axis gain over the pixel', unit: '×', better: 'higher', needs: 'pixel-source',
    read: (s) => pair(s.pixelOnAxisGain, s.pixelOnAxisGainStdErr),
  },
  maxDeltaUvTo60: {
    label: 'Colour shift to 60° (max Δu′v′)', phrase: 'colour shift to 60° (max Δu′v′)', unit: '', better: 'lower', needs: 'spectrum',
    read: (s) => pair(s.maxDeltaUvTo60, s.maxDeltaUvTo60StdErr),
  },
  photopicOnAxisGain: {
    label: 'Photopic on-axis gain', phrase: 'photopic on-axis gain', unit: '×', better: 'higher', needs: 'spectrum',
    read: (s) => pair(s.photopicOnAxisGain, s.photopicOnAxisGainStdErr),
  },
  measuredGain: {
    label: 'Gain as measured on the panel', phrase: 'gain as measured on the panel', unit: '×', better: 'higher', needs: 'panel',
    read: (s) => pair(s.measuredGain, s.measuredGainStdErr),
  },
  edgeLoss: {
    label: 'Lost at the panel edges', phrase: 'light lost at the panel edges', unit: '%', better: 'lower', needs: 'panel',
    read: (s) => pair(s.edgeLoss, s.edgeLossStdErr),
  },
} as const satisfies Record<string, FigureDefinition>

export type Figure = keyof typeof FIGURES
export const FIGURE_KEYS = Object.keys(FIGURES) as [Figure, ...Figure[]]
export const DEFAULT_FIGURE: Figure = 'enhancement'

export function figureDefinition(figure: string): FigureDefinition {
  return (FIGURES as Record<string, FigureDefinition>)[figure] ?? FIGURES[DEFAULT_FIGURE]
}

/** The figure a cell is ranked by, read from its stored summary (null: none stored, or the design has no such figure). */
export function figureOf(summary: CellSummary | null | undefined, figure: string): FigureValue | null {
  return summary ? figureDefinition(figure).read(summary) : null
}

/** True when `a` beats `b` by the figure's own direction. */
export function figureBeats(figure: string, a: number, b: number): boolean {
  return figureDefinition(figure).better === 'lower' ? a < b : a > b
}

const NEED_MESSAGES: Record<FigureNeed, string> = {
  'pixel-source': 'needs a disc or rectangle source; this design emits over the whole panel',
  spectrum: 'needs an emission spectrum; this design emits at one wavelength without colour outputs',
  panel: 'needs a finite panel (size, edges and a detector); this design is the infinite array',
}

/** Null when the design produces the figure, else why not (in the trade's words, for a 400 and the form). */
export function figureUnavailable(figure: string, scenario: Pick<Scenario, 'emitter'> & { panel?: unknown }): string | null {
  const def = figureDefinition(figure)
  if (def.needs === 'pixel-source' && scenario.emitter.source.shape === 'extended') return `Ranking by ${def.phrase} ${NEED_MESSAGES['pixel-source']}`
  if (def.needs === 'spectrum' && !scenario.emitter.spectrum) return `Ranking by ${def.phrase} ${NEED_MESSAGES.spectrum}`
  if (def.needs === 'panel' && scenario.panel == null) return `Ranking by ${def.phrase} ${NEED_MESSAGES.panel}`
  return null
}

/** Index of the best finished cell by the figure (its own direction), or null. */
export function bestCellIndex(cells: Array<{ cellIndex: number; status: string; summary: CellSummary | null }>, figure: string): number | null {
  let best: number | null = null
  let bestValue = NaN
  for (const c of cells) {
    if (c.status !== 'done') continue
    const f = figureOf(c.summary, figure)
    if (!f || !Number.isFinite(f.value)) continue
    if (best === null || figureBeats(figure, f.value, bestValue)) { bestValue = f.value; best = c.cellIndex }
  }
  return best
}
