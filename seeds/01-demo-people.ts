import type { Knex } from 'knex'
import { hashPassword } from '../server/services/passwords'
import { demoAccounts, demoLabs, demoPassword } from './data/demo-accounts'

/**
 * Demo labs, people and roles. Idempotent: labs are matched by slug, people by email; running it
 * again restores names, roles and the demo password but keeps ids (and so everything linked to them).
 */
export async function seed(knex: Knex): Promise<void> {
  // Each account gets its own salt; hashing in parallel keeps the seed near one hash's time per core.
  const hashes = await Promise.all(demoAccounts.map(() => hashPassword(demoPassword)))
  await knex.transaction(async (trx) => {
    const labIds = new Map<string, number>()
    for (const lab of demoLabs) {
      const [row]: { id: number }[] = await trx('labs')
        .insert({ slug: lab.slug, name: lab.name })
        .onConflict('slug')
        .merge(['name'])
        .returning('id')
      labIds.set(lab.slug, row.id)
    }

    for (const [index, account] of demoAccounts.entries()) {
      const passwordHash = hashes[index]
      const [user]: { id: number }[] = await trx('users')
        .insert({
          email: account.email,
          name: account.name,
          is_admin: account.isAdmin,
          password_hash: passwordHash,
        })
        .onConflict('email')
        .merge({
          name: account.name,
          is_admin: account.isAdmin,
          password_hash: passwordHash,
          deleted_at: null,
          updated_at: trx.fn.now(),
        })
        .returning('id')

      // The demo roles are exactly these: memberships in demo labs not listed here are removed.
      const demoLabIds = [...labIds.values()]
      const wanted = account.memberships.map((m) => labIds.get(m.labSlug)!)
      await trx('memberships')
        .where({ user_id: user.id })
        .whereIn('lab_id', demoLabIds)
        .whereNotIn('lab_id', wanted)
        .delete()
      for (const membership of account.memberships) {
        await trx('memberships')
          .insert({ user_id: user.id, lab_id: labIds.get(membership.labSlug), role: membership.role })
          .onConflict(['user_id', 'lab_id'])
          .merge(['role'])
      }
    }
  })
}
