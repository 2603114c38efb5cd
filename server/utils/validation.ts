// zod at the boundary: turns a schema into a validator for readValidatedBody/getValidatedQuery/
// getValidatedRouterParams whose failure is a 400 naming the field, e.g. "lensArray.pitchUm: must be positive".
import { createError } from 'h3'
import type { z } from 'zod'
import { scenarioErrorMessages } from '../../shared/types/scenario'

/** One sentence per issue, naming the field. Issues inside a body's `scenario` use the editor's trade wording. */
export function describeIssues(error: z.ZodError, input?: unknown): string {
  return error.issues
    .map((issue) => {
      if (issue.path[0] === 'scenario' && input && typeof input === 'object') {
        const inner = { ...issue, path: issue.path.slice(1) }
        const [msg] = scenarioErrorMessages({ issues: [inner] } as unknown as z.ZodError, (input as { scenario?: unknown }).scenario)
        return msg!
      }
      const path = issue.path.map(String).join('.')
      // Our schemas usually name the field in the message already; only prefix it when they do not.
      return !path || issue.message.includes(path) ? issue.message : `${path}: ${issue.message}`
    })
    .join('; ')
}

export function zodValidator<S extends z.ZodType>(schema: S) {
  return (input: unknown): z.output<S> => {
    const result = schema.safeParse(input)
    if (!result.success) {
      throw createError({
        statusCode: 400,
        statusMessage: 'Bad Request',
        message: describeIssues(result.error, input),
        data: { issues: result.error.issues.map((i) => ({ path: i.path.map(String).join('.'), message: i.message })) },
      })
    }
    return result.data
  }
}
