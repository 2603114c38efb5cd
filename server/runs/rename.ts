// Renaming a run or sweep (its name shows on its page, in lists, the shortlist and compare legends).
import { eq } from 'drizzle-orm'
import { runs, type Run } from '../db/schema'
import { useDb } from '../utils/db'

export async function renameRun(runId: string, name: string): Promise<Run | null> {
  const [run] = await useDb().update(runs).set({ name }).where(eq(runs.id, runId)).returning()
  return run ?? null
}
