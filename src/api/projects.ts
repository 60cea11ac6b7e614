import type { Project, ProjectCreate, ProjectUpdate } from '../../shared/schemas/datasets'
import { request } from './http'

const base = '/api/v1/projects'

/** Projects of the caller's labs (or of one lab), each with its number of datasets. */
export function listProjects(labId?: number): Promise<Project[]> {
  return request<Project[]>(labId === undefined ? base : `${base}?labId=${labId}`)
}

export function createProject(input: ProjectCreate): Promise<Project> {
  return request<Project>(base, { method: 'POST', body: input })
}

export function updateProject(projectId: number, changes: ProjectUpdate): Promise<Project> {
  return request<Project>(`${base}/${projectId}`, { method: 'PATCH', body: changes })
}
