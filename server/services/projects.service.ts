import type { CurrentUser } from '../../shared/schemas/auth'
import type { Project, ProjectCreate, ProjectUpdate } from '../../shared/schemas/datasets'
import { db } from '../db'
import { ConflictError } from '../errors/app-error'
import {
  findProject,
  findProjectByName,
  insertProject,
  listProjects,
  updateProject,
} from '../repositories/projects.repo'
import { readableLabIds } from '../../shared/access'
import { writable } from '../access/records'

/** Projects group a lab's datasets. Members read them; scientists and PIs create and rename them. */
export async function listProjectsFor(user: CurrentUser, labId?: number): Promise<Project[]> {
  const labs = readableLabIds(user).filter((id) => labId === undefined || id === labId)
  return listProjects(labs)
}

export async function createProjectFor(user: CurrentUser, input: ProjectCreate): Promise<Project> {
  await writable(user, 'lab', input.labId, { subject: 'project' })
  return db.transaction(async (trx) => {
    if (await findProjectByName(input.labId, input.name, trx))
      throw new ConflictError(`The lab already has a project named “${input.name}”.`)
    const id = await insertProject(
      { labId: input.labId, name: input.name, description: input.description, createdBy: user.id },
      trx,
    )
    return (await findProject(id, trx))!
  })
}

export async function updateProjectFor(
  user: CurrentUser,
  projectId: number,
  changes: ProjectUpdate,
): Promise<Project> {
  const project = await writable(user, 'project', projectId)
  if (changes.name !== undefined && changes.name !== project.name) {
    const clash = await findProjectByName(project.labId, changes.name)
    if (clash) throw new ConflictError(`The lab already has a project named “${changes.name}”.`)
  }
  await updateProject(projectId, changes)
  return (await findProject(projectId))!
}
