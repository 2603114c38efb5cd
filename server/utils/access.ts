// Role checks, done on the server for every route. A project (or design) of a team the user is not in is
// reported as 404, so that ids of other teams' work cannot be probed; a member whose role is too low gets 403.
import { and, eq } from 'drizzle-orm'
import { createError, type H3Event } from 'h3'
import type { User } from 'lucia'
import { designs, memberships, projects, type Design, type Project, type Role } from '../db/schema'
import { requireUser } from './auth'
import { useDb } from './db'
// EDITOR_ROLES (lead, designer), which the routes pass here, lives in shared/utils/roles.ts beside roleCanEdit (the app's canEdit).

export const ANY_ROLE: readonly Role[] = ['lead', 'designer', 'viewer']

function forbidden(role: Role, allowed: readonly Role[], what: string) {
  return createError({
    statusCode: 403,
    statusMessage: 'Forbidden',
    message: `Your role in this team is ${role}; ${what} needs ${allowed.join(' or ')}. Ask a team lead to change your role.`,
  })
}

/** The user's role in teamId, or 403/404. */
export async function requireTeamRole(event: H3Event, teamId: string, allowed: readonly Role[], what = 'this action') {
  const user = requireUser(event)
  const [m] = await useDb().select({ role: memberships.role }).from(memberships)
    .where(and(eq(memberships.teamId, teamId), eq(memberships.userId, user.id)))
  if (!m) throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'Team not found among your teams.' })
  if (!allowed.includes(m.role)) throw forbidden(m.role, allowed, what)
  return { user, role: m.role }
}

export async function requireProjectRole(
  event: H3Event, projectId: string, allowed: readonly Role[], what = 'this action',
): Promise<{ user: User, project: Project, role: Role }> {
  const user = requireUser(event)
  const [row] = await useDb().select({ project: projects, role: memberships.role }).from(projects)
    .innerJoin(memberships, and(eq(memberships.teamId, projects.teamId), eq(memberships.userId, user.id)))
    .where(eq(projects.id, projectId))
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'Project not found among your teams\' projects.' })
  if (!allowed.includes(row.role)) throw forbidden(row.role, allowed, what)
  return { user, project: row.project, role: row.role }
}

export async function requireDesignRole(
  event: H3Event, designId: string, allowed: readonly Role[], what = 'this action',
): Promise<{ user: User, project: Project, design: Design, role: Role }> {
  const user = requireUser(event)
  const [row] = await useDb().select({ design: designs, project: projects, role: memberships.role }).from(designs)
    .innerJoin(projects, eq(projects.id, designs.projectId))
    .innerJoin(memberships, and(eq(memberships.teamId, projects.teamId), eq(memberships.userId, user.id)))
    .where(eq(designs.id, designId))
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'Design not found among your teams\' projects.' })
  if (!allowed.includes(row.role)) throw forbidden(row.role, allowed, what)
  return { user, project: row.project, design: row.design, role: row.role }
}
