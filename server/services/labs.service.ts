import type { CurrentUser } from '../../shared/schemas/auth'
import type { InvitationSummary } from '../../shared/schemas/invitations'
import type { LabCreate, LabMember, LabSummary } from '../../shared/schemas/labs'
import { db } from '../db'
import { ConflictError, NotFoundError } from '../errors/app-error'
import {
  findLabById,
  findLabByNameOrSlug,
  insertLab,
  listAllLabs,
  listLabsOfUser,
  slugsStartingWith,
} from '../repositories/labs.repo'
import { listMembersOfLab } from '../repositories/memberships.repo'
import { recordAudit } from './audit.service'
import { createInvitationIn } from './invitations.service'

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

/** "Nimbus Neurite Lab" → "nimbus-neurite-lab"; letters outside a–z lose their accents or drop out. */
export function slugFor(name: string): string {
  const slug = name
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 60)
    .replace(/-+$/g, '')
  return slug || 'lab'
}

function firstFreeSlug(base: string, taken: string[]): string {
  const used = new Set(taken)
  if (!used.has(base)) return base
  for (let n = 2; ; n += 1) if (!used.has(`${base}-${n}`)) return `${base}-${n}`
}

/** Instance administrators create labs; naming a first PI invites them in the same transaction. */
export async function createLab(
  admin: CurrentUser,
  input: LabCreate,
): Promise<{ lab: LabSummary; invitation: InvitationSummary | null }> {
  return db.transaction(async (trx) => {
    const base = slugFor(input.name)
    const clash = await findLabByNameOrSlug(input.name, base, trx)
    if (clash && clash.name.toLowerCase() === input.name.toLowerCase()) {
      throw new ConflictError(`A lab named “${clash.name}” already exists.`, { reason: 'name_taken' })
    }
    const lab = await insertLab(
      { name: input.name, slug: firstFreeSlug(base, await slugsStartingWith(base, trx)) },
      trx,
    )
    await recordAudit(trx, {
      action: 'lab.created',
      actorUserId: admin.id,
      labId: lab.id,
      subjectType: 'lab',
      subjectId: lab.id,
      details: {
        name: lab.name,
        slug: lab.slug,
        ...(input.firstPiEmail ? { firstPiEmail: input.firstPiEmail } : {}),
      },
    })
    const invitation = input.firstPiEmail
      ? await createInvitationIn(trx, admin, lab, { email: input.firstPiEmail, role: 'pi' })
      : null
    return {
      lab: { id: lab.id, name: lab.name, slug: lab.slug, memberCount: 0, myRole: null },
      invitation,
    }
  })
}
