import type { AdminUserListItem } from '../../shared/schemas/users'
import { listActiveUsers } from '../repositories/users.repo'
import { listMembershipsOfUsers } from '../repositories/memberships.repo'

/** Everyone with an active account and their lab roles, for the people overview of administrators. */
export async function listUsersWithMemberships(): Promise<AdminUserListItem[]> {
  const users = await listActiveUsers()
  const memberships = await listMembershipsOfUsers(users.map((u) => u.id))
  const byUser = new Map<number, typeof memberships>()
  for (const m of memberships) byUser.set(m.userId, [...(byUser.get(m.userId) ?? []), m])
  return users.map((u) => ({
    id: u.id,
    email: u.email,
    name: u.name,
    isAdmin: u.isAdmin,
    createdAt: u.createdAt.toISOString(),
    memberships: (byUser.get(u.id) ?? []).map(({ labId, labName, role }) => ({ labId, labName, role })),
  }))
}
