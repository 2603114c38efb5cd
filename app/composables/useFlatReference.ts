// The flat device to overlay on a result: the newest finished run in the project of a design without a lens array
// (its own traced angular profile; the planar companion inside a run reports only its totals).
export interface FlatReference { runId: string; name: string; designName: string; result: any }

export async function loadFlatReference(projectId: string): Promise<FlatReference | null> {
  try {
    const [{ designs }, { runs }] = await Promise.all([
      $fetch<{ designs: Array<{ id: string; scenario: any }> }>(`/api/projects/${projectId}/designs`),
      $fetch<{ runs: Array<{ id: string; name: string; designId: string | null; designName: string; status: string }> }>('/api/runs', { query: { projectId, kind: 'single' } }),
    ])
    const flat = new Set(designs.filter((d) => d.scenario?.lensArray === null).map((d) => d.id))
    const run = runs.find((r) => r.status === 'done' && r.designId && flat.has(r.designId))
    if (!run) return null
    const { result } = await $fetch<{ result: any }>(`/api/runs/${run.id}/cells/0`)
    return result ? { runId: run.id, name: run.name, designName: run.designName, result } : null
  } catch {
    return null
  }
}
