/**
 * Preloaded (node --import) into the analyzer the benchmark times: on exit, writes the process's
 * peak resident memory (kB) to the file named by NESTWISE_MAX_RSS_FILE, so the command line itself
 * still prints nothing but its JSON.
 */
import { writeFileSync } from 'node:fs'

const target = process.env.NESTWISE_MAX_RSS_FILE
if (target) process.on('exit', () => writeFileSync(target, String(process.resourceUsage().maxRSS)))
