import type { Membership } from '../../shared/schemas/auth'
import { defaultConn, preparedQuery, type Conn } from './connection'

export interface User {
  id: number
  email: string
  name: string
  isAdmin: boolean
  createdAt: Date
  updatedAt: Date
}

export interface UserWithPasswordHash extends User {
  passwordHash: string
}

interface UserRow {
  id: number
  email: string
  name: string
  password_hash: string
  is_admin: boolean
  created_at: Date
  updated_at: Date
  deleted_at: Date | null
}

type PublicUserRow = Omit<UserRow, 'password_hash' | 'deleted_at'>

const publicColumns = ['id', 'email', 'name', 'is_admin', 'created_at', 'updated_at']

function toUser(row: PublicUserRow): User {
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    isAdmin: row.is_admin,
    createdAt: row.created_at,
    updatedAt: row.updated_at,
  }
}

/** Only for sign-in: the one place the password hash leaves the database. */
export async function findActiveUserWithHashByEmail(
  email: string,
  conn: Conn = defaultConn,
): Promise<UserWithPasswordHash | undefined> {
  const row: UserRow | undefined = await conn('users')
    .where({ email: email.toLowerCase() })
    .whereNull('deleted_at')
    .first()
  return row ? { ...toUser(row), passwordHash: row.password_hash } : undefined
}

export async function findActiveUserById(id: number, conn: Conn = defaultConn): Promise<User | undefined> {
  const row: PublicUserRow | undefined = await conn('users')
    .select(publicColumns)
    .where({ id })
    .whereNull('deleted_at')
    .first()
  return row ? toUser(row) : undefined
}

export async function listActiveUsers(conn: Conn = defaultConn): Promise<User[]> {
  const rows: PublicUserRow[] = await conn('users')
    .select(publicColumns)
    .whereNull('deleted_at')
    .orderBy([{ column: 'name' }, { column: 'id' }])
  return rows.map(toUser)
}

export interface NewUser {
  email: string
  name: string
  passwordHash: string
  isAdmin?: boolean
}

export async function insertUser(user: NewUser, conn: Conn = defaultConn): Promise<User> {
  const [row]: PublicUserRow[] = await conn('users')
    .insert({
      email: user.email.toLowerCase(),
      name: user.name,
      password_hash: user.passwordHash,
      is_admin: user.isAdmin ?? false,
    })
    .returning(publicColumns)
  return toUser(row)
}

export async function softDeleteUser(id: number, conn: Conn = defaultConn): Promise<void> {
  await conn('users').where({ id }).update({ deleted_at: conn.fn.now(), updated_at: conn.fn.now() })
}

/** A user with their lab memberships (lab name order), as every signed-in request needs them. */
export interface UserWithMemberships extends User {
  memberships: Membership[]
}

// One round trip, planned once per connection: it runs on every signed-in request.
const selectUserWithMemberships = preparedQuery<PublicUserRow & { memberships: Membership[] }>(
  'users.with-memberships',
  `SELECT u.id, u.email, u.name, u.is_admin, u.created_at, u.updated_at,
          coalesce((SELECT json_agg(json_build_object('labId', m.lab_id, 'labName', l.name, 'role', m.role)
                                    ORDER BY l.name, m.lab_id)
                      FROM memberships m JOIN labs l ON l.id = m.lab_id
                     WHERE m.user_id = u.id), '[]'::json) AS memberships
     FROM users u
    WHERE u.id = $1 AND u.deleted_at IS NULL`,
)

export async function findActiveUserWithMemberships(
  id: number,
  conn: Conn = defaultConn,
): Promise<UserWithMemberships | undefined> {
  const [row] = await selectUserWithMemberships([id], conn)
  return row ? { ...toUser(row), memberships: row.memberships } : undefined
}
