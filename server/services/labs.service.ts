import type { CurrentUser } from '../../shared/schemas/auth'
import type { LabMember, LabSummary } from '../../shared/schemas/labs'
import { NotFoundError } from '../errors/app-error'
import { findLabById, listAllLabs, listLabsOfUser } from '../repositories/labs.repo'
import { listMembersOfLab } from '../repositories/memberships.repo'

/** Labs the user belongs to; instance administrators see every lab (they manage labs and roles). */
export async function listLabsVisibleTo(user: CurrentUser): Promise<LabSummary[]> {
  const labs = user.isAdmin ? await listAllLabs(user.id) : await listLabsOfUser(user.id)
  return labs.map(({ id, name, slug, memberCount, myRole }) => ({ id, name, slug, memberCount, myRole }))
}

/** Membership (or admin rights) is checked by the route's requireLabRole before this runs. */
export async function listLabMembers(labId: number): Promise<LabMember[]> {
  if (!(await findLabById(labId))) throw new NotFoundError('Lab not found.')
  return listMembersOfLab(labId)
}
