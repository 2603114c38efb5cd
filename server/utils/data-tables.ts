// Uploaded measurement tables (CSV): lens profiles, emitter angular profiles, refractive-index tables, emission spectra. The body is
// refused with 413 from its declared Content-Length before a byte of it is read; a body without a declared length
// is refused with 411 (a limit on what is read would do too, but every upload client sends the length). The
// content is then checked by shared/utils/csv-table.ts and stored in one insert, or not at all.
import { and, desc, eq } from 'drizzle-orm'
import { createError, getRequestHeader, readRawBody, type H3Event } from 'h3'
import { dataTables, users, type DataTable } from '../db/schema'
import { fileNameProblem, MAX_TABLE_BYTES, parseDataTable, type DataTableKind } from '../../shared/utils/csv-table'
import { fitProblems, fitProfile, minFitPoints, type ProfileFitOptions } from '../../shared/utils/profile-fit'
import { MAX_PROFILE_ROWS } from '../../shared/types/scenario'
import type { Db } from './db'

const UNIQUE_VIOLATION = '23505'
/** Drizzle wraps the driver's error; the Postgres code sits on it or on its cause. */
const isUniqueViolation = (err: unknown) => {
  const e = err as { code?: string; cause?: { code?: string } }
  return e?.code === UNIQUE_VIOLATION || e?.cause?.code === UNIQUE_VIOLATION
}

/** Checks the declared length, then reads the body (at most MAX_TABLE_BYTES). */
export async function readUploadBody(event: H3Event): Promise<Uint8Array> {
  const declared = getRequestHeader(event, 'content-length')
  if (declared === undefined) {
    throw createError({ statusCode: 411, statusMessage: 'Length Required', message: 'Send the file with a Content-Length header (curl --data-binary @file.csv does).' })
  }
  const length = Number(declared)
  if (!Number.isInteger(length) || length < 0) throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'Content-Length must be a whole number of bytes.' })
  if (length > MAX_TABLE_BYTES) {
    throw createError({ statusCode: 413, statusMessage: 'Payload Too Large', message: `The file is ${length} bytes; at most ${MAX_TABLE_BYTES} (2 MB) and ${100_000} rows are accepted. Thin the trace or split the table.` })
  }
  if (length === 0) throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'The file is empty.' })
  const body = await readRawBody(event, false)
  return body ? new Uint8Array(body) : new Uint8Array()
}

const refuse = (messages: string[], errors: { line: number; message: string }[] = messages.map((message) => ({ line: Number(/^line (\d+)/.exec(message)?.[1] ?? 0), message }))) =>
  createError({ statusCode: 422, statusMessage: 'Unprocessable Entity', message: `Nothing was stored. ${messages.join('; ')}`, data: { errors } })

/** The fit of a lens-profile trace, or a 422 naming the line when the trace cannot be one cap. */
function fitTrace(rows: number[][], lines: number[], fit: ProfileFitOptions) {
  const need = minFitPoints(fit)
  if (rows.length < need) throw refuse([`the ${fit.method} fit needs at least ${need} data rows; the trace has ${rows.length}`])
  const result = fitProfile(rows, fit)
  const problems = fitProblems(result, lines)
  if (problems.length) throw refuse(problems)
  return result
}

export async function storeDataTable(db: Db, opts: {
  projectId: string; kind: DataTableKind; name: string; fileName: string; userId: string; bytes: Uint8Array
  fit?: ProfileFitOptions | null
}) {
  const nameProblem = fileNameProblem(opts.fileName)
  if (nameProblem) throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: nameProblem })
  if (opts.fit && opts.kind !== 'lens_profile') {
    throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: `fit applies to lens profiles only; a ${opts.kind} table is stored as uploaded (send fit=none)` })
  }
  const parsed = parseDataTable(opts.kind, opts.bytes, { trace: !!opts.fit })
  if (!parsed.ok) {
    const first = parsed.errors.slice(0, 5).map((e) => e.message).join('; ')
    throw createError({
      statusCode: parsed.status,
      statusMessage: parsed.status === 413 ? 'Payload Too Large' : parsed.status === 415 ? 'Unsupported Media Type' : 'Unprocessable Entity',
      message: `Nothing was stored. ${first}${parsed.errors.length > 5 ? ` (and ${parsed.errors.length - 5} more)` : ''}`,
      data: { errors: parsed.errors },
    })
  }
  const fit = opts.fit ? fitTrace(parsed.rows, parsed.lines!, opts.fit) : null
  try {
    const [row] = await db.insert(dataTables).values({
      projectId: opts.projectId, kind: opts.kind, name: opts.name, fileName: opts.fileName, columns: parsed.columns,
      rows: parsed.rows, rowCount: parsed.rows.length, uploadedBy: opts.userId,
      fit: fit ? { method: fit.method, rmsResidualNm: fit.rmsResidualNm, maxResidualNm: fit.maxResidualNm, smoothPoints: fit.smoothPoints,
        params: fit.params } : null,
      fittedRows: fit ? fit.rows : null,
      sourceText: new TextDecoder('utf-8').decode(opts.bytes),
    }).returning()
    return describeTable(row!)
  } catch (err) {
    if (isUniqueViolation(err)) {
      throw createError({ statusCode: 409, statusMessage: 'Conflict', message: `This project already has a ${opts.kind} table named "${opts.name}"; choose another name.` })
    }
    throw err
  }
}

/** A table without its rows, plus how it is used in a scenario. */
export function describeTable(t: DataTable) {
  const { rows, fittedRows, sourceText, ...rest } = t
  return { ...rest, use: tableUse(t) }
}

/** The scenario fragment a table becomes (lens profile → lensArray fields, angular profile → angularProfile, n,k
 * table → an index, emission spectrum → emitter.spectrum; scenarios may also refer to the last two by tableId). A
 * fitted trace becomes its fitted rows; the raw rows stay stored beside them. */
export function tableUse(t: Pick<DataTable, 'kind' | 'rows'> & { fittedRows?: number[][] | null }) {
  if (t.kind === 'angular_profile') return { angularProfile: { table: t.rows } }
  if (t.kind === 'refractive_index') return { index: { table: t.rows } }
  if (t.kind === 'emission_spectrum') return { spectrum: { table: t.rows } }
  if (t.kind === 'lens_profile') {
    const rows = t.fittedRows ?? t.rows
    const first = rows[0]!, last = rows[rows.length - 1]!
    // Heights relative to the rim row: the scenario's profile starts at the land. A long trace is thinned to
    // MAX_PROFILE_ROWS evenly spaced rows (first and last kept) so every run cell's stored scenario stays small.
    const n = rows.length
    const picked = n <= MAX_PROFILE_ROWS ? rows : Array.from({ length: MAX_PROFILE_ROWS }, (_, i) => rows[Math.round((i * (n - 1)) / (MAX_PROFILE_ROWS - 1))]!)
    const profile = picked.map((r) => [r[0]!, r[1]! - last[1]!])
    // Sag to 1e-6 µm: a fitted profile's sag carries float noise far below anything a line makes or a trace resolves.
    return { lensArray: { shape: 'measured', profile, diameterUm: 2 * last[0]!, sagUm: Number((first[1]! - last[1]!).toFixed(6)) } }
  }
  return null
}

export function listDataTables(db: Db, projectId: string) {
  return db.select({
    id: dataTables.id, kind: dataTables.kind, name: dataTables.name, fileName: dataTables.fileName, columns: dataTables.columns,
    rowCount: dataTables.rowCount, fit: dataTables.fit, createdAt: dataTables.createdAt, uploadedBy: users.name,
  }).from(dataTables).leftJoin(users, eq(users.id, dataTables.uploadedBy))
    .where(eq(dataTables.projectId, projectId)).orderBy(desc(dataTables.createdAt))
}

export async function getDataTable(db: Db, id: string, teamProjectIds?: string[]) {
  const [row] = await db.select().from(dataTables).where(and(eq(dataTables.id, id)))
  if (!row || (teamProjectIds && !teamProjectIds.includes(row.projectId))) return null
  return row
}
