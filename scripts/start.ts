// `npm start`: PostgreSQL on loopback, migrations, demo seed, client build, then one server for app
// and API, started again (with a growing pause) whenever it dies. Ctrl-C stops the server and the
// database; nothing else does. A production deployment gets the same from its process manager
// (docs/deploy.md).
import { spawn } from 'node:child_process'
import { ensurePostgres, stopPostgres } from './lib/postgres'
import { prepareDatabase } from './lib/database'
import { run } from './lib/run'
import { supervise } from './lib/supervise'
import { config } from '../server/config'
import { demoAccounts, demoPassword } from '../seeds/data/demo-accounts'

ensurePostgres()
await prepareDatabase(config.PGDATABASE, { seed: true })
console.log('[setup] building the client…')
run('npx', ['vite', 'build', '--logLevel', 'warn'])

const server = supervise({
  start: () => spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], { stdio: 'inherit' }),
  onExit: ({ code, signal, restartInMs }) => {
    const how = signal ? `was stopped by ${signal}` : `exited with code ${code}`
    console.error(
      `\n[start] the server ${how}; the database stays up. Starting the server again in ${restartInMs / 1000} s…`,
    )
  },
})

const url = `http://${config.HOST}:${config.PORT}`
setTimeout(() => {
  console.log(`\nNestwise is running at ${url}\n`)
  console.log(`Demo accounts (demo only; password for all: ${demoPassword}):`)
  for (const account of demoAccounts) console.log(`  ${account.email.padEnd(22)} ${account.description}`)
  console.log('\nPress Ctrl-C to stop the server and the database.')
}, 1500)

let stopping = false
async function shutdown(): Promise<void> {
  if (stopping) return
  stopping = true
  await server.stop()
  stopPostgres()
  process.exit(0)
}
process.on('SIGINT', () => void shutdown())
process.on('SIGTERM', () => void shutdown())
