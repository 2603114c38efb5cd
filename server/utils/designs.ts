// Designs: named, versioned scenarios inside a project. Every saved change makes the next version.
import { and, desc, eq, sql } from 'drizzle-orm'
import { createError } from 'h3'
import { designs, users, type Design } from '../db/schema'
import type { DesignCreateInput, DesignUpdateInput } from '../../shared/types/design'
import { isUniqueViolation } from './api-errors'
import type { Db } from './db'

function nameTaken(name: string) {
  return createError({ statusCode: 409, statusMessage: 'Conflict', message: `name: this project already has a design called "${name}"; choose another name.` })
}

export async function listDesigns(db: Db, projectId: string) {
  return db.select({
    id: designs.id,
    name: designs.name,
    version: designs.version,
    authorName: users.name,
    createdAt: designs.createdAt,
    updatedAt: designs.updatedAt,
    scenario: designs.scenario,
  })
    .from(designs)
    .leftJoin(users, eq(users.id, designs.authorId))
    .where(eq(designs.projectId, projectId))
    .orderBy(desc(designs.updatedAt))
}

export async function createDesign(db: Db, projectId: string, authorId: string, input: DesignCreateInput): Promise<Design> {
  try {
    const [row] = await db.insert(designs).values({ projectId, authorId, name: input.name, scenario: input.scenario }).returning()
    return row!
  } catch (err) {
    if (isUniqueViolation(err, 'designs_project_name_key')) throw nameTaken(input.name)
    throw err
  }
}

/**
 * Saves a change as the next version. When the body names the version it was based on, a design changed by
 * someone else in the meantime is refused with 409 instead of being overwritten silently.
 */
export async function updateDesign(db: Db, current: Design, authorId: string, input: DesignUpdateInput): Promise<Design> {
  const base = input.baseVersion ?? current.version
  try {
    const [row] = await db.update(designs)
      .set({
        name: input.name ?? current.name,
        scenario: input.scenario ?? current.scenario,
        authorId,
        version: sql`${designs.version} + 1`,
        updatedAt: new Date(),
      })
      .where(and(eq(designs.id, current.id), eq(designs.version, base)))
      .returning()
    if (!row) {
      throw createError({
        statusCode: 409,
        statusMessage: 'Conflict',
        message: `baseVersion: the design was changed since version ${base}; reload it and apply your change again.`,
      })
    }
    return row
  } catch (err) {
    if (isUniqueViolation(err, 'designs_project_name_key')) throw nameTaken(input.name ?? current.name)
    throw err
  }
}

export async function deleteDesign(db: Db, designId: string) {
  await db.delete(designs).where(eq(designs.id, designId))
}
