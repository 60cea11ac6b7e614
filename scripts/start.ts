// `npm start`: PostgreSQL on loopback, migrations, demo seed, client build, then one server for app and API.
import { spawn } from 'node:child_process'
import { ensurePostgres, stopPostgres } from './lib/postgres'
import { prepareDatabase } from './lib/database'
import { run } from './lib/run'
import { config } from '../server/config'
import { demoAccounts, demoPassword } from '../seeds/data/demo-accounts'

ensurePostgres()
await prepareDatabase(config.PGDATABASE, { seed: true })
console.log('[setup] building the client…')
run('npx', ['vite', 'build', '--logLevel', 'warn'])

const server = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], { stdio: 'inherit' })

const url = `http://${config.HOST}:${config.PORT}`
setTimeout(() => {
  console.log(`\nNestwise is running at ${url}\n`)
  console.log(`Demo accounts (demo only; password for all: ${demoPassword}):`)
  for (const account of demoAccounts) console.log(`  ${account.email.padEnd(22)} ${account.description}`)
  console.log('\nPress Ctrl-C to stop the server and the database.')
}, 1500)

let stopping = false
function shutdown(code: number): void {
  if (stopping) return
  stopping = true
  server.kill('SIGTERM')
  server.once('exit', () => {
    stopPostgres()
    process.exit(code)
  })
}
process.on('SIGINT', () => shutdown(0))
process.on('SIGTERM', () => shutdown(0))
server.on('exit', (code) => {
  if (!stopping) {
    stopping = true
    stopPostgres()
    process.exit(code ?? 1)
  }
})
