import { dropDatabase } from './lib/database'

/**
 * After the browser tests: drops the database this run made (named for the run in
 * playwright.config.ts), unless E2E_KEEP_DATABASE is set for looking at it afterwards.
 */
export default async function dropE2eDatabase(): Promise<void> {
  const name = process.env.E2E_DATABASE
  if (!name || process.env.E2E_KEEP_DATABASE) return
  await dropDatabase(name)
}
