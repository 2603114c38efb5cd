// The team page's routes: a lead changes roles and removes members; the new role takes effect at once; a team
// never loses its last lead (409 naming the person); bad input gets a message naming the field.
import pg from 'pg'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { signedUpClient } from './client'

const pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 2 })
let lead: Awaited<ReturnType<typeof signedUpClient>>
let member: Awaited<ReturnType<typeof signedUpClient>>
let projectId = ''

beforeAll(async () => {
  lead = await signedUpClient('team-lead')
  member = await signedUpClient('team-member')
  await pool.query(`INSERT INTO memberships (team_id, user_id, role) VALUES ($1, $2, 'viewer')`, [lead.teamId, member.userId])
  projectId = (await lead.client.post('/api/projects', { teamId: lead.teamId, name: 'Team page' })).body.project.id
})
afterAll(async () => { await pool.end() })

const memberPath = (userId: string) => `/api/teams/${lead.teamId}/members/${userId}`

describe('team members', () => {
  it('a lead makes a viewer designer; the designer can then write, and the members list shows it', async () => {
    expect((await member.client.post(`/api/projects/${projectId}/designs`, { name: 'Before' })).status).toBe(403)
    const r = await lead.client.patch(memberPath(member.userId), { role: 'designer' })
    expect(r.status).toBe(200)
    expect(r.body.member).toMatchObject({ role: 'designer', previousRole: 'viewer' })
    const list = (await member.client.get(`/api/teams/${lead.teamId}/members`)).body.members
    expect(list.find((m: { id: string }) => m.id === member.userId).role).toBe('designer')
  })

  it('the last lead can be neither demoted nor removed (409); with a second lead, the first may step down', async () => {
    const demote = await lead.client.patch(memberPath(lead.userId), { role: 'designer' })
    expect(demote.status).toBe(409)
    expect(demote.body.message).toMatch(/Test team-lead is the team's only lead; making them designer would leave nobody .* Make another member lead first\./)
    const remove = await lead.client.delete(memberPath(lead.userId))
    expect(remove.status).toBe(409)
    expect(remove.body.message).toMatch(/only lead; removing them/)
    expect((await lead.client.patch(memberPath(member.userId), { role: 'lead' })).status).toBe(200)
    expect((await lead.client.patch(memberPath(lead.userId), { role: 'designer' })).status).toBe(200)
    // Now the member is the only lead, and the former lead (designer) may no longer change roles.
    const back = await lead.client.patch(memberPath(lead.userId), { role: 'lead' })
    expect(back.status).toBe(403)
    expect(back.body.message).toMatch(/changing roles needs lead/)
    expect((await member.client.patch(memberPath(lead.userId), { role: 'lead' })).status).toBe(200)
  })

  it('a removed member loses access at once; removing a non-member is 404; bad input names the field', async () => {
    const extra = await signedUpClient('team-extra')
    await pool.query(`INSERT INTO memberships (team_id, user_id, role) VALUES ($1, $2, 'designer')`, [lead.teamId, extra.userId])
    expect((await extra.client.get(`/api/projects/${projectId}`)).status).toBe(200)
    const r = await lead.client.delete(memberPath(extra.userId))
    expect(r.status).toBe(200)
    expect((await extra.client.get(`/api/projects/${projectId}`)).status).toBe(404)
    expect((await lead.client.delete(memberPath(extra.userId))).status).toBe(404)
    const bad = await lead.client.patch(memberPath(member.userId), { role: 'owner' })
    expect(bad.status).toBe(400)
    expect(bad.body.message).toMatch(/role must be one of lead, designer, viewer/)
  })
})
