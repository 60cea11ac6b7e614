import type { Membership } from '../../../shared/schemas/auth'
import type { DatasetSummary, Project } from '../../../shared/schemas/datasets'

export interface ProjectGroup {
  id: number
  name: string
  description: string
  datasets: DatasetSummary[]
}

export interface LabGroup {
  labId: number
  labName: string
  projects: ProjectGroup[]
}

/**
 * Datasets by lab (in membership order) and project (by name), datasets newest change first.
 * Projects without datasets are kept, so a freshly created project still shows where to upload.
 */
export function groupDatasets(
  memberships: readonly Membership[],
  projects: readonly Project[],
  datasets: readonly DatasetSummary[],
): LabGroup[] {
  return memberships.map((membership) => {
    const byProject = new Map<number, ProjectGroup>()
    for (const project of projects) {
      if (project.labId !== membership.labId) continue
      byProject.set(project.id, {
        id: project.id,
        name: project.name,
        description: project.description,
        datasets: [],
      })
    }
    for (const dataset of datasets) {
      if (dataset.labId !== membership.labId) continue
      let group = byProject.get(dataset.project.id)
      if (!group) {
        group = { id: dataset.project.id, name: dataset.project.name, description: '', datasets: [] }
        byProject.set(group.id, group)
      }
      group.datasets.push(dataset)
    }
    for (const group of byProject.values()) {
      group.datasets.sort((a, b) => b.updatedAt.localeCompare(a.updatedAt) || b.id - a.id)
    }
    return {
      labId: membership.labId,
      labName: membership.labName,
      projects: [...byProject.values()].sort((a, b) => a.name.localeCompare(b.name)),
    }
  })
}
