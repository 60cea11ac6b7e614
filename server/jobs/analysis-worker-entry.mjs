// Entry of the analysis worker thread. A worker does not inherit the parent's tsx loader, and on
// Node 20 `new Worker(file, { execArgv: ['--import', 'tsx'] })` resolves a .ts entry before tsx is
// registered ("Unknown file extension .ts"). Registering tsx here first works under
// `node --import tsx server/index.ts`, under vitest, and on newer Node versions alike.
import { register } from 'tsx/esm/api'

register()
await import('./analysis-worker.ts')
