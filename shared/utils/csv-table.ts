// Reading uploaded measurement tables (CSV) into rows of numbers, with one error per bad line. Pure: the upload
// route, the browser preview and the tests use the same rules.
//
// Rules (each refusal names the line and, where it helps, the column):
// - Text only: a NUL byte, invalid UTF-8 or a known binary signature (ZIP/Excel, PDF, PNG, GIF, gzip) is refused
//   whatever the file is called; the file name never decides what the content is.
// - The first non-comment line is the header; its columns must be those of the table kind (a few aliases, units in
//   parentheses ignored). Lines starting with '#' are comments (profilometer exports carry metadata); blank lines
//   are skipped. Separator: comma, semicolon or tab, detected from the header. papaparse splits the lines into
//   cells (a cell in double quotes may hold the separator, RFC 4180 §2); cells are trimmed.
// - Formula-looking cells are refused: a cell starting with '=', '+', '-', '@' (and tab/CR, per the OWASP advice
//   on CSV injection) unless the whole cell is a plain decimal number. So "-0.5" and "+1e-3" are numbers, while
//   "=1+2", "-1+2", "@SUM(A1)" and "+A1" are refused as formulas. Such a cell would run as a formula when the
//   table is exported and opened in a spreadsheet.
// - Every other cell must be a plain decimal number (no thousands separators, no units); then per-kind checks.
// - An emission spectrum (wavelength_nm, intensity) has wavelengths of 200–2500 nm increasing, intensities ≥ 0 (one
//   above 0) and at most 5000 rows: what a scenario's `emitter.spectrum.table` holds.
// - A lens profile to be fitted (`{ trace: true }`, see profile-fit.ts) may rise towards the rim and need not have
//   its centre above the rim: the fit decides whether it is a cap. It must still start at r_um = 0, have r_um
//   increasing and no negative heights.

import Papa from 'papaparse'

export type DataTableKind = 'lens_profile' | 'angular_profile' | 'refractive_index' | 'emission_spectrum'

export const MAX_TABLE_BYTES = 2 * 1024 * 1024
export const MAX_TABLE_ROWS = 100_000

interface ColumnSpec { name: string; aliases: string[] }

export const TABLE_COLUMNS: Record<DataTableKind, ColumnSpec[]> = {
  lens_profile: [
    { name: 'r_um', aliases: ['r', 'radius', 'radius_um', 'radial_um', 'r_um'] },
    { name: 'height_um', aliases: ['z', 'z_um', 'h', 'h_um', 'height', 'height_um'] },
  ],
  angular_profile: [
    { name: 'theta_deg', aliases: ['theta', 'theta_deg', 'angle', 'angle_deg'] },
    { name: 'intensity', aliases: ['intensity', 'relative_intensity', 'rel_intensity', 'i', 'rel'] },
  ],
  refractive_index: [
    { name: 'wavelength_nm', aliases: ['wavelength', 'wavelength_nm', 'lambda', 'lambda_nm'] },
    { name: 'n', aliases: ['n'] },
    { name: 'k', aliases: ['k'] },
  ],
  emission_spectrum: [
    { name: 'wavelength_nm', aliases: ['wavelength', 'wavelength_nm', 'lambda', 'lambda_nm'] },
    { name: 'intensity', aliases: ['intensity', 'relative_intensity', 'rel_intensity', 'power', 'relative_power', 'spd', 'counts'] },
  ],
}

/** Most rows an emission spectrum may have: what a scenario's spectrum table holds (shared/types/scenario.ts). */
export const MAX_SPECTRUM_ROWS = 5000

export interface TableLineError { line: number; column?: string; message: string }

export type TableParseResult =
  | { ok: true; columns: string[]; rows: number[][]; lines?: number[] }
  | { ok: false; status: 413 | 415 | 422; errors: TableLineError[] }

const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/
const FORMULA_START = /^[=+\-@\t\r]/

/** True for a cell a spreadsheet would run as a formula (see the rules above). */
export function isFormulaCell(cell: string): boolean {
  return FORMULA_START.test(cell) && !NUMBER.test(cell.trim())
}

const SIGNATURES: Array<[number[], string]> = [
  [[0x50, 0x4b, 0x03, 0x04], 'a ZIP archive (an Excel .xlsx workbook?)'],
  [[0xd0, 0xcf, 0x11, 0xe0], 'an old Office document (.xls?)'],
  [[0x25, 0x50, 0x44, 0x46], 'a PDF'],
  [[0x89, 0x50, 0x4e, 0x47], 'a PNG image'],
  [[0x47, 0x49, 0x46, 0x38], 'a GIF image'],
  [[0x1f, 0x8b], 'a gzip archive'],
]

/** Why the bytes are not a text table, or null when they are. */
export function sniffBinary(bytes: Uint8Array): string | null {
  for (const [sig, what] of SIGNATURES) {
    if (sig.every((b, i) => bytes[i] === b)) return `the file is ${what}, not a CSV text table; export it as CSV first`
  }
  if (bytes.includes(0)) return 'the file contains NUL bytes, so it is binary, not a CSV text table'
  try {
    new TextDecoder('utf-8', { fatal: true }).decode(bytes)
  } catch {
    return 'the file is not UTF-8 text; save it as CSV (UTF-8)'
  }
  return null
}

/** A file name to show and store: refused when it looks like a path or carries control characters. */
export function fileNameProblem(name: string): string | null {
  if (!name) return 'fileName is required'
  if (name.length > 200) return 'fileName must be at most 200 characters'
  if (/[/\\]/.test(name) || name.includes('..')) return `fileName must be a plain file name, not a path: got ${JSON.stringify(name)}`
  // eslint-disable-next-line no-control-regex
  if (/[\u0000-\u001f\u007f]/.test(name)) return 'fileName must not contain control characters'
  if (name.startsWith('.') || /^[a-z]:/i.test(name)) return `fileName must be a plain file name: got ${JSON.stringify(name)}`
  return null
}

function normalizeHeader(cell: string): string {
  return cell.trim().replace(/^"|"$/g, '').toLowerCase().replace(/\(.*?\)|\[.*?\]/g, '').replace(/µ|μ/g, 'u').trim().replace(/[\s-]+/g, '_').replace(/_+$/, '')
}

/**
 * The table's data lines as trimmed cells, each with its 1-based line number in the file. Comment and blank lines
 * are blanked before papaparse splits the rest (so they cannot open a quote), and papaparse's cursor gives each
 * row's first line even when a quoted cell spans lines.
 */
function splitTable(lines: string[], sep: string): Array<{ line: number, cells: string[] }> {
  const text = lines.map((l) => (l.trim() === '' || l.trim().startsWith('#') ? '' : l)).join('\n')
  const out: Array<{ line: number, cells: string[] }> = []
  let rowStart = 0
  let line = 1
  Papa.parse<string[]>(text, {
    delimiter: sep,
    newline: '\n',
    step(row) {
      const cells = row.data.map((c) => c.trim())
      if (cells.length > 1 || cells[0] !== '') out.push({ line, cells })
      const end = row.meta.cursor
      for (let i = rowStart; i < end; i++) if (text.charCodeAt(i) === 10) line++
      rowStart = end
    },
  })
  return out
}

/** Errors listed at most; the count of the rest is reported in a last line. */
const MAX_ERRORS = 50

export function parseDataTable(kind: DataTableKind, bytes: Uint8Array, opts: { trace?: boolean } = {}): TableParseResult {
  if (bytes.byteLength > MAX_TABLE_BYTES) return { ok: false, status: 413, errors: [{ line: 0, message: `the file is ${bytes.byteLength} bytes; at most ${MAX_TABLE_BYTES} (2 MB) are accepted` }] }
  const binary = sniffBinary(bytes)
  if (binary) return { ok: false, status: 415, errors: [{ line: 1, message: binary }] }
  const text = new TextDecoder('utf-8').decode(bytes).replace(/^\uFEFF/, '')
  const lines = text.split(/\r\n|\n|\r/)
  const spec = TABLE_COLUMNS[kind]
  const errors: TableLineError[] = []
  let extraErrors = 0
  const fail = (e: TableLineError) => { if (errors.length < MAX_ERRORS) errors.push(e); else extraErrors++ }

  const first = lines.find((l) => l.trim() !== '' && !l.trim().startsWith('#'))
  if (first === undefined) return { ok: false, status: 422, errors: [{ line: 1, message: `the file has no header line; the first line must be ${spec.map((c) => c.name).join(',')}` }] }
  const sep = first.includes('\t') ? '\t' : first.includes(';') && !first.includes(',') ? ';' : ','
  const [header, ...body] = splitTable(lines, sep)
  {
    const { line, cells } = header!
    const formula = cells.find(isFormulaCell)
    if (formula !== undefined) return { ok: false, status: 422, errors: [{ line, message: `line ${line}: cell ${JSON.stringify(formula)} looks like a spreadsheet formula; formulas are refused` }] }
    const got = cells.map(normalizeHeader)
    const okHeader = got.length === spec.length && spec.every((c, j) => c.aliases.includes(got[j]!))
    if (!okHeader) {
      const named = cells.map((c) => JSON.stringify(c)).join(', ') || 'nothing'
      return { ok: false, status: 422, errors: [{ line, message: `line ${line}: the header must name the columns ${spec.map((c) => c.name).join(', ')} in this order; got ${named}` }] }
    }
  }

  const rows: number[][] = []
  const lineOf: number[] = []
  for (const { line: lineNo, cells } of body) {
    if (rows.length + errors.length + extraErrors >= MAX_TABLE_ROWS) {
      return { ok: false, status: 413, errors: [{ line: lineNo, message: `line ${lineNo}: more than ${MAX_TABLE_ROWS} data rows; split the table or thin the trace` }] }
    }
    if (cells.length !== spec.length) {
      fail({ line: lineNo, message: `line ${lineNo}: expected ${spec.length} values (${spec.map((c) => c.name).join(', ')}), got ${cells.length}` })
      rows.push([])
      lineOf.push(lineNo)
      continue
    }
    const row: number[] = []
    let bad = false
    cells.forEach((c, j) => {
      const col = spec[j]!.name
      if (isFormulaCell(c)) {
        fail({ line: lineNo, column: col, message: `line ${lineNo}, ${col}: ${JSON.stringify(c)} looks like a spreadsheet formula; formulas are refused` })
        bad = true
      } else if (!NUMBER.test(c)) {
        fail({ line: lineNo, column: col, message: `line ${lineNo}, ${col}: ${JSON.stringify(c)} is not a number (use a plain decimal such as 1.25 or 3e-2)` })
        bad = true
      } else {
        const v = Number(c)
        if (!Number.isFinite(v)) { fail({ line: lineNo, column: col, message: `line ${lineNo}, ${col}: ${c} is out of range` }); bad = true }
        row.push(v)
      }
    })
    rows.push(bad ? [] : row)
    lineOf.push(lineNo)
  }
  if (rows.length < 2 && errors.length === 0) {
    return { ok: false, status: 422, errors: [{ line: lines.length, message: `the table needs at least 2 data rows; got ${rows.length}` }] }
  }
  checkKind(kind, rows, lineOf, fail, opts.trace === true)
  errors.sort((x, y) => x.line - y.line)
  if (extraErrors) errors.push({ line: 0, message: `… and ${extraErrors} more problem(s)` })
  if (errors.length) return { ok: false, status: 422, errors }
  return opts.trace ? { ok: true, columns: spec.map((c) => c.name), rows, lines: lineOf } : { ok: true, columns: spec.map((c) => c.name), rows }
}

function checkKind(kind: DataTableKind, rows: number[][], lineOf: number[], fail: (e: TableLineError) => void, trace: boolean) {
  const [c0, c1, c2] = TABLE_COLUMNS[kind].map((c) => c.name)
  let prev: number | null = null
  let prevLine = 0
  for (let i = 0; i < rows.length; i++) {
    const r = rows[i]!
    const line = lineOf[i]!
    if (r.length === 0) { prev = null; continue }
    const [a, b, c] = r as [number, number, number]
    if (prev !== null && !(a > prev)) {
      fail({ line, column: c0, message: `line ${line}, ${c0}: must increase line by line (got ${a} after ${prev} on line ${prevLine})` })
    }
    prev = a
    prevLine = line
    if (kind === 'lens_profile') {
      if (a < 0) fail({ line, column: c0, message: `line ${line}, ${c0}: radial position must be 0 or more, got ${a}` })
      if (b < 0) fail({ line, column: c1, message: `line ${line}, ${c1}: height must be 0 or more (heights are above the flat land), got ${b}` })
    } else if (kind === 'angular_profile') {
      if (a < 0 || a > 180) fail({ line, column: c0, message: `line ${line}, ${c0}: must be between 0 and 180 degrees, got ${a}` })
      if (b < 0) fail({ line, column: c1, message: `line ${line}, ${c1}: relative intensity must be 0 or more, got ${b}` })
    } else if (kind === 'emission_spectrum') {
      // the wavelengths a scenario traces (shared/types/scenario.ts: 200–2500 nm)
      if (a < 200 || a > 2500) fail({ line, column: c0, message: `line ${line}, ${c0}: must be between 200 and 2500 nm, got ${a}` })
      if (b < 0) fail({ line, column: c1, message: `line ${line}, ${c1}: relative spectral power must be 0 or more, got ${b}` })
    } else {
      if (a < 100 || a > 20_000) fail({ line, column: c0, message: `line ${line}, ${c0}: must be between 100 and 20000 nm, got ${a}` })
      if (b < 1 || b > 5) fail({ line, column: c1, message: `line ${line}, ${c1}: refractive index n must be between 1 and 5, got ${b}` })
      if (c < 0 || c > 10) fail({ line, column: c2, message: `line ${line}, ${c2}: extinction coefficient k must be between 0 and 10, got ${c}` })
    }
  }
  const good = rows.filter((r) => r.length > 0)
  if (kind === 'lens_profile' && good.length === rows.length) {
    const first = good[0]!, last = good[good.length - 1]!
    if (first[0] !== 0) fail({ line: lineOf[0]!, column: c0, message: `line ${lineOf[0]}, ${c0}: the profile must start at the lens centre (r_um = 0), got ${first[0]}` })
    for (let i = 1; i < good.length && !trace; i++) {
      if (good[i]![1]! > good[i - 1]![1]!) {
        fail({ line: lineOf[i]!, column: c1, message: `line ${lineOf[i]}, ${c1}: height must not rise towards the rim (got ${good[i]![1]} after ${good[i - 1]![1]}); fit the trace at upload (isotonic or conic/asphere) or level it first` })
        break
      }
    }
    if (!trace && !(first[1]! > last[1]!)) fail({ line: lineOf[0]!, column: c1, message: `line ${lineOf[0]}, ${c1}: the centre must be higher than the rim (a lens with sag > 0)` })
  }
  if (kind === 'angular_profile' && good.length === rows.length && !good.some((r) => r[1]! > 0)) {
    fail({ line: lineOf[0]!, column: c1, message: 'at least one relative intensity must be above 0' })
  }
  if (kind === 'emission_spectrum' && good.length === rows.length) {
    if (!good.some((r) => r[1]! > 0)) fail({ line: lineOf[0]!, column: c1, message: 'at least one relative spectral power must be above 0' })
    if (good.length > MAX_SPECTRUM_ROWS) fail({ line: lineOf[MAX_SPECTRUM_ROWS]!, message: `line ${lineOf[MAX_SPECTRUM_ROWS]}: an emission spectrum may have at most ${MAX_SPECTRUM_ROWS} rows; got ${good.length} (bin it, e.g. to 1 nm)` })
  }
}
