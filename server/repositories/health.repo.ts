import { defaultConn, type Conn } from './connection'

/** Resolves when the database answers a trivial query within `timeoutMs`. */
export async function pingDatabase(timeoutMs = 2000, conn: Conn = defaultConn): Promise<void> {
  await conn.raw('select 1').timeout(timeoutMs, { cancel: false })
}
