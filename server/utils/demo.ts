// Demo data, an invented scenario: Tallowby Luminous Panels, a made-up maker of OLED lighting tiles, with one
// user per role, one project and a few saved designs. Every row is addressed by its natural key (e-mail, team
// slug, project name in team, design name in project) and inserted only when missing, so loading twice changes
// nothing, and edits made to demo rows survive a reload.
import { and, eq } from 'drizzle-orm'
import { designs, memberships, projects, teams, users, type Role } from '../db/schema'
import { scenarioSchema, type ScenarioInput } from '../../shared/types/scenario'
import type { Db } from './db'
import { hashPassword } from './password'
import { generateIdFromEntropySize } from 'lucia'

export const DEMO_TEAM = { slug: 'tallowby-luminous', name: 'Tallowby Luminous Panels' }

export const DEMO_USERS: readonly { email: string, name: string, role: Role, password: string }[] = [
  { email: 'ines.marlow@tallowby.example', name: 'Ines Marlow', role: 'lead', password: 'demo-lead-tallowby' },
  { email: 'tomas.okafor@tallowby.example', name: 'Tomas Okafor', role: 'designer', password: 'demo-designer-tallowby' },
  { email: 'priya.halden@tallowby.example', name: 'Priya Halden', role: 'viewer', password: 'demo-viewer-tallowby' },
]

export const DEMO_PROJECT = {
  name: 'TL-40 warm-white tile: extraction film',
  description: 'Bottom-emitting 40 mm warm-white tile on 100 µm glass. Goal: a lens film that lifts extraction '
    + 'well above the flat device while the embossing line can still mould it (sag ≤ 5 µm).',
  limits: { maxSagUm: 5 },
}

const device = {
  emitter: { index: 1.7, angularProfile: 'isotropic', source: { shape: 'extended' } },
  reflector: { reflectance: 0.8, diffuseFraction: 0 },
  substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0 },
  trace: { rays: 1_000_000, seed: 1, fresnel: 'averaged' },
} satisfies Omit<ScenarioInput, 'lensArray'>

export const DEMO_DESIGNS: readonly { name: string, author: string, scenario: ScenarioInput }[] = [
  { name: 'Flat tile (reference)', author: 'tomas.okafor@tallowby.example', scenario: { ...device, lensArray: null } },
  {
    name: 'Hex hemispheres, 10 µm',
    author: 'tomas.okafor@tallowby.example',
    scenario: { ...device, lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical', index: 1.5 } },
  },
  {
    name: 'Hex shallow caps, 10 µm, sag 2.5 µm',
    author: 'tomas.okafor@tallowby.example',
    scenario: { ...device, lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 2.5, shape: 'spherical', index: 1.5 } },
  },
  {
    name: 'Square caps, 12 µm pitch',
    author: 'ines.marlow@tallowby.example',
    scenario: { ...device, lensArray: { lattice: 'square', pitchUm: 12, diameterUm: 11, sagUm: 4, shape: 'spherical', index: 1.5 } },
  },
]

/** Loads the demo data in one transaction; returns the ids of the demo team and project. */
export async function loadDemoData(db: Db): Promise<{ teamId: string, projectId: string }> {
  // Validate before writing anything: a demo scenario the engine no longer accepts is a bug to fix here.
  const parsedDesigns = DEMO_DESIGNS.map((d) => ({ ...d, scenario: scenarioSchema.parse(d.scenario) }))
  return db.transaction(async (tx) => {
    const userIds = new Map<string, string>()
    for (const u of DEMO_USERS) {
      const [existing] = await tx.select({ id: users.id }).from(users).where(eq(users.email, u.email))
      if (existing) {
        userIds.set(u.email, existing.id)
        continue
      }
      const id = generateIdFromEntropySize(10)
      await tx.insert(users).values({ id, email: u.email, name: u.name, passwordHash: await hashPassword(u.password) })
      userIds.set(u.email, id)
    }

    await tx.insert(teams).values(DEMO_TEAM).onConflictDoNothing({ target: teams.slug })
    const [team] = await tx.select({ id: teams.id }).from(teams).where(eq(teams.slug, DEMO_TEAM.slug))

    await tx.insert(memberships)
      .values(DEMO_USERS.map((u) => ({ teamId: team!.id, userId: userIds.get(u.email)!, role: u.role })))
      .onConflictDoNothing({ target: [memberships.teamId, memberships.userId] })

    await tx.insert(projects).values({ teamId: team!.id, ...DEMO_PROJECT })
      .onConflictDoNothing({ target: [projects.teamId, projects.name] })
    const [project] = await tx.select({ id: projects.id }).from(projects)
      .where(and(eq(projects.teamId, team!.id), eq(projects.name, DEMO_PROJECT.name)))

    await tx.insert(designs)
      .values(parsedDesigns.map((d) => ({ projectId: project!.id, name: d.name, authorId: userIds.get(d.author)!, scenario: d.scenario })))
      .onConflictDoNothing({ target: [designs.projectId, designs.name] })

    return { teamId: team!.id, projectId: project!.id }
  })
}
