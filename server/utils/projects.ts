// Projects: listed across the user's teams, created inside one team.
import { count, desc, eq } from 'drizzle-orm'
import { createError } from 'h3'
import { designs, memberships, projects, teams } from '../db/schema'
import type { ProjectCreateInput } from '../../shared/types/project'
import { isUniqueViolation } from './api-errors'
import type { Db } from './db'

export async function listProjectsOfUser(db: Db, userId: string) {
  return db.select({
    id: projects.id,
    name: projects.name,
    description: projects.description,
    teamId: teams.id,
    teamName: teams.name,
    role: memberships.role,
    designCount: count(designs.id),
    updatedAt: projects.updatedAt,
  })
    .from(projects)
    .innerJoin(memberships, eq(memberships.teamId, projects.teamId))
    .innerJoin(teams, eq(teams.id, projects.teamId))
    .leftJoin(designs, eq(designs.projectId, projects.id))
    .where(eq(memberships.userId, userId))
    .groupBy(projects.id, teams.id, memberships.role)
    .orderBy(desc(projects.updatedAt))
}

export async function createProject(db: Db, input: ProjectCreateInput) {
  try {
    const [project] = await db.insert(projects).values(input).returning()
    return project!
  } catch (err) {
    if (isUniqueViolation(err, 'projects_team_name_key')) {
      throw createError({ statusCode: 409, statusMessage: 'Conflict', message: `name: this team already has a project called "${input.name}"; choose another name.` })
    }
    throw err
  }
}
