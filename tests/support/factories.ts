import type { Role } from '../../shared/schemas/auth'
import { insertLab, type Lab } from '../../server/repositories/labs.repo'
import { upsertMembership } from '../../server/repositories/memberships.repo'
import { insertUser, type User } from '../../server/repositories/users.repo'
import { hashPassword } from '../../server/services/passwords'

// Test users get a cheap scrypt cost (stored with the hash, so sign-in uses it too); the
// production cost is covered by server/services/passwords.test.ts.
const TEST_SCRYPT = { N: 2 ** 12, r: 8, p: 1 }

export const TEST_PASSWORD = 'test-password-42'

let sequence = 0

/** Unique across test files and runs, so tests never see each other's rows. */
export function uniqueSuffix(): string {
  sequence += 1
  return `${Date.now().toString(36)}-${process.pid}-${sequence}`
}

export function uniqueEmail(label = 'user'): string {
  return `${label}-${uniqueSuffix()}@example.test`
}

export interface UserSpec {
  email?: string
  name?: string
  password?: string
  isAdmin?: boolean
  memberships?: { lab: Lab; role: Role }[]
}

export interface TestUser extends User {
  password: string
}

export async function createUser(spec: UserSpec = {}): Promise<TestUser> {
  const password = spec.password ?? TEST_PASSWORD
  const user = await insertUser({
    email: spec.email ?? uniqueEmail(),
    name: spec.name ?? `Test Person ${uniqueSuffix()}`,
    passwordHash: await hashPassword(password, TEST_SCRYPT),
    isAdmin: spec.isAdmin ?? false,
  })
  for (const { lab, role } of spec.memberships ?? []) {
    await upsertMembership({ userId: user.id, labId: lab.id, role })
  }
  return { ...user, password }
}

export async function createLab(spec: { name?: string } = {}): Promise<Lab> {
  const suffix = uniqueSuffix()
  return insertLab({ name: spec.name ?? `Test Lab ${suffix}`, slug: `test-lab-${suffix}` })
}

/** A lab with one member per role, for permission tests. */
export async function createLabWithTeam(): Promise<{
  lab: Lab
  pi: TestUser
  scientist: TestUser
  biostatistician: TestUser
}> {
  const lab = await createLab()
  const [pi, scientist, biostatistician] = await Promise.all(
    (['pi', 'scientist', 'biostatistician'] as const).map((role) =>
      createUser({ email: uniqueEmail(role), memberships: [{ lab, role }] }),
    ),
  )
  return { lab, pi, scientist, biostatistician }
}
