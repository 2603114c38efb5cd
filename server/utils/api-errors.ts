// Errors in one place. Every route is defined with `defineApiHandler`, which maps what the database says into the
// statuses the API documents: a unique violation (SQLSTATE 23505) becomes 409 with a sentence naming what is taken,
// a lost or refused connection becomes 503. Drizzle 0.45 wraps the driver's error (the code sits on `.cause`), and
// other layers wrap again, so the whole cause chain is searched. Helpers below build the common refusals.
import { createError, defineEventHandler, isError, type EventHandler, type EventHandlerRequest, type H3Error, type H3Event } from 'h3'
import { databaseUnavailableError, isDatabaseUnavailable } from './unavailable'

const UNIQUE_VIOLATION = '23505'

/** The errors along `err.cause` (the error itself first), at most 8 deep. */
function causeChain(err: unknown): Array<Record<string, unknown>> {
  const out: Array<Record<string, unknown>> = []
  let e = err
  while (e && typeof e === 'object' && out.length < 8) {
    out.push(e as Record<string, unknown>)
    e = (e as { cause?: unknown }).cause
  }
  return out
}

/** The Postgres unique-violation error somewhere in the chain (optionally of one constraint), else undefined. */
export function uniqueViolation(err: unknown, constraint?: string): { constraint?: string } | undefined {
  const found = causeChain(err).find((e) => e.code === UNIQUE_VIOLATION)
  if (!found) return undefined
  if (constraint && found.constraint !== constraint) return undefined
  return { constraint: typeof found.constraint === 'string' ? found.constraint : undefined }
}

export function isUniqueViolation(err: unknown, constraint?: string): boolean {
  return uniqueViolation(err, constraint) !== undefined
}

/** A connection failure anywhere in the chain (Drizzle wraps the driver's error). */
export function isConnectionFailure(err: unknown): boolean {
  return causeChain(err).some((e) => isDatabaseUnavailable(e) || (isError(e) && (e as H3Error).statusCode === 503))
}

// What a leftover unique violation means, by constraint name (server/db/schema.ts). Utils that know the name the
// user typed throw their own, more specific 409 first; these are the fallback.
const CONFLICT_MESSAGES: Record<string, string> = {
  users_email_key: 'An account with this e-mail already exists: sign in instead.',
  teams_slug_key: 'A team with a name this close already exists; choose another team name.',
  projects_team_name_key: 'name: this team already has a project with this name; choose another name.',
  designs_project_name_key: 'name: this project already has a design with this name; choose another name.',
  data_tables_project_name_key: 'name: this project already has a table of this kind with this name; choose another name.',
  shortlist_entries_cell_key: 'This cell is already on the shortlist.',
  shortlist_entries_chosen_key: 'Another entry was chosen at the same moment; reload the shortlist and choose again.',
  run_cells_run_cell_key: 'This cell was written at the same moment by another request; reload and try again.',
}

export function notFound(message: string) {
  return createError({ statusCode: 404, statusMessage: 'Not Found', message })
}
export function forbidden(message: string) {
  return createError({ statusCode: 403, statusMessage: 'Forbidden', message })
}
export function conflict(message: string) {
  return createError({ statusCode: 409, statusMessage: 'Conflict', message })
}

/** Maps a thrown error to the documented status; H3 errors other than a wrapped 503 pass unchanged. */
export function toApiError(err: unknown): unknown {
  if (isError(err) && (err as H3Error).statusCode !== 500) return err
  if (isConnectionFailure(err)) return databaseUnavailableError(err)
  const unique = uniqueViolation(err)
  if (unique) {
    return conflict((unique.constraint && CONFLICT_MESSAGES[unique.constraint])
      ?? 'This already exists (another request may have created it a moment ago); reload and try again.')
  }
  return err
}

/**
 * A request whose client went away (closed the socket, or was cut off by the server's request timeout) while its
 * body was being read: one log line and a handled 400, instead of an unhandled error with its stack.
 */
function clientAborted(event: H3Event, err: unknown): H3Error | undefined {
  const e = err as { code?: string; message?: string }
  // Not req.destroyed: Node destroys a request stream once its body has been read, aborted or not.
  const req = event.node.req as typeof event.node.req & { aborted?: boolean }
  const gone = req.aborted === true || req.socket?.destroyed === true || (e?.code === 'ECONNRESET' && /aborted/i.test(e.message ?? ''))
  if (!gone || (isError(err) && (err as H3Error).statusCode < 500)) return undefined
  console.warn(`[request aborted] ${event.method} ${event.path.split('?')[0]}: the client closed the connection before the request was complete`)
  return createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'The request was cut off before it was complete; send it again.' })
}

/** `defineEventHandler` with the database's errors mapped (see the top of this file). Use it for every route. */
export function defineApiHandler<Req extends EventHandlerRequest, Res>(handler: EventHandler<Req, Res>): EventHandler<Req, Res> {
  return defineEventHandler<Req>(async (event) => {
    try {
      return await handler(event)
    } catch (err) {
      throw clientAborted(event, err) ?? toApiError(err)
    }
  }) as EventHandler<Req, Res>
}
