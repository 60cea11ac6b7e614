import { LEAD_ROLE } from '../../shared/access'
import type { CurrentUser, Role } from '../../shared/schemas/auth'
import type { LabMember } from '../../shared/schemas/labs'
import { db } from '../db'
import { ConflictError, NotFoundError } from '../errors/app-error'
import type { Conn } from '../repositories/connection'
import { findLabById } from '../repositories/labs.repo'
import {
  deleteMembership,
  findMembership,
  listMembersOfLab,
  lockPiMemberships,
  updateMembershipRole,
} from '../repositories/memberships.repo'
import { recordAudit } from './audit.service'

/** A lab must keep at least one PI: someone has to be able to manage it. */
async function memberToChange(trx: Conn, labId: number, userId: number) {
  if (!(await findLabById(labId, trx))) throw new NotFoundError('Lab not found.')
  // Lock the PI rows first: two requests demoting the last two PIs then queue up and recount.
  const piIds = await lockPiMemberships(labId, trx)
  const membership = await findMembership(userId, labId, trx)
  if (!membership) throw new NotFoundError('This person is not a member of the lab.')
  const member = (await listMembersOfLab(labId, trx)).find((m) => m.userId === userId)
  return { membership, piIds, email: member?.email ?? null }
}

function assertNotLastPi(piIds: number[], userId: number, what: string): void {
  if (piIds.length === 1 && piIds[0] === userId) {
    throw new ConflictError(`${what}: a lab needs at least one PI. Make someone else PI first.`, {
      reason: 'last_pi',
    })
  }
}

/** The route has checked that the actor is a PI of the lab or an admin. */
export async function changeMemberRole(
  actor: CurrentUser,
  labId: number,
  userId: number,
  role: Role,
): Promise<LabMember> {
  return db.transaction(async (trx) => {
    const { membership, piIds, email } = await memberToChange(trx, labId, userId)
    if (membership.role !== role) {
      if (membership.role === LEAD_ROLE) assertNotLastPi(piIds, userId, 'This is the last PI of the lab')
      await updateMembershipRole(userId, labId, role, trx)
      await recordAudit(trx, {
        action: 'member.role_changed',
        actorUserId: actor.id,
        labId,
        subjectType: 'user',
        subjectId: userId,
        details: { email, from: membership.role, to: role },
      })
    }
    return (await listMembersOfLab(labId, trx)).find((m) => m.userId === userId)!
  })
}

export async function removeMember(actor: CurrentUser, labId: number, userId: number): Promise<void> {
  await db.transaction(async (trx) => {
    const { membership, piIds, email } = await memberToChange(trx, labId, userId)
    if (membership.role === LEAD_ROLE) assertNotLastPi(piIds, userId, 'The last PI cannot be removed')
    await deleteMembership(userId, labId, trx)
    await recordAudit(trx, {
      action: 'member.removed',
      actorUserId: actor.id,
      labId,
      subjectType: 'user',
      subjectId: userId,
      details: { email, role: membership.role },
    })
  })
}
