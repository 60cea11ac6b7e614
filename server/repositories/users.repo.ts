import { defaultConn, type Conn } from './connection'

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
