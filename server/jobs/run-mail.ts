// The "sweep finished" mail: sent to whoever started the sweep, after the transaction that closed the run has
// committed (server/jobs/worker.ts), from the web server's embedded worker or a stand-alone worker alike. A crash
// between the commit and the send loses the mail, never the result; sending twice cannot happen because only the
// transaction that moved the run out of queued/running reports it closed.
import { usePool } from '../utils/db'
import { composeMail, publicBaseUrl, sendMail } from '../utils/mail'
import { figureOf, type CellSummary } from './runs'
import { AXIS_PARAMETERS, type AxisParameter } from '../../shared/types/sweep'

const FIGURE_NAMES: Record<string, string> = { enhancement: 'enhancement', extraction: 'extraction', onAxisLuminance: 'on-axis luminance', pixelOnAxisGain: 'on-axis gain over the pixel', maxDeltaUvTo60: 'largest colour shift Δu′v′ over 0–60° (lower is better)', photopicOnAxisGain: 'photopic on-axis gain' }

export function formatWithSigma(value: number, sigma: number): string {
  // Digits to the σ's second significant figure (common practice for Monte Carlo figures).
  const digits = sigma > 0 ? Math.max(0, Math.min(8, 1 - Math.floor(Math.log10(sigma)))) : 4
  return `${value.toFixed(digits)} ± ${sigma.toFixed(digits)}`
}

export async function sendRunFinishedMail(runId: string): Promise<boolean> {
  const pool = usePool()
  const { rows: [run] } = await pool.query(
    `SELECT r.id, r.kind, r.name, r.status, r.figure, r.best_cell_index, r.axes, r.cells_total, r.design_name,
            p.name AS project_name, u.email, u.name AS user_name
     FROM runs r JOIN projects p ON p.id = r.project_id LEFT JOIN users u ON u.id = r.created_by WHERE r.id = $1`, [runId])
  if (!run || run.kind !== 'sweep' || !run.email) return false
  const { rows: cells } = await pool.query(
    `SELECT cell_index, coordinates, summary, status FROM run_cells WHERE run_id = $1`, [runId])
  const done = cells.filter((c) => c.status === 'done').length
  const best = cells.find((c) => c.cell_index === run.best_cell_index)
  const figureName = FIGURE_NAMES[run.figure] ?? run.figure
  const lines = [
    `Your sweep "${run.name}" of ${run.design_name} in ${run.project_name} has ${run.status === 'done' ? 'finished' : 'ended'}: ${done} of ${run.cells_total} cells traced.`,
  ]
  if (best) {
    const f = figureOf(best.summary as CellSummary, run.figure)
    // in the editor's words and units, never internal field paths
    const axes = (run.axes as Array<{ parameter: string }>).map((a, i) => {
      const p = AXIS_PARAMETERS[a.parameter as AxisParameter]
      const v = Number(((best.coordinates as number[])[i]!).toPrecision(4))
      return p ? `${p.label.toLowerCase()} ${v}${p.unit ? ` ${p.unit}` : ''}` : `${a.parameter} ${v}`
    }).join(', ')
    lines.push(`Best cell by ${figureName}: cell ${best.cell_index} (${axes}), ${figureName} ${f ? formatWithSigma(f.value, f.stdErr) : 'n/a'}.`)
  } else {
    lines.push('No cell finished, so there is no best cell; the sweep page lists each cell\'s reason.')
  }
  return sendMail(composeMail(run.email, `Sweep finished: ${run.name}`, lines, { label: 'Open the sweep', url: `${publicBaseUrl()}/sweeps/${run.id}` }))
}

/** Fire-and-forget after commit: a mail problem is logged and never fails the batch. */
export function reportRunClosed(runId: string) {
  void sendRunFinishedMail(runId).catch((err) => console.error(`[mail] sweep ${runId} finished mail:`, (err as Error).message))
}
