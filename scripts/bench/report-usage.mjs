/**
 * Preloaded (node --import) into the analyzer the benchmark times: on exit, writes the process's
 * peak resident memory (kB) and CPU time (all threads, seconds) as JSON to the file named by
 * NESTWISE_USAGE_FILE, so the command line itself still prints nothing but its JSON.
 */
import { writeFileSync } from 'node:fs'

const target = process.env.NESTWISE_USAGE_FILE
if (target) {
  process.on('exit', () => {
    const usage = process.resourceUsage()
    writeFileSync(
      target,
      JSON.stringify({ maxRssKb: usage.maxRSS, cpuSeconds: (usage.userCPUTime + usage.systemCPUTime) / 1e6 }),
    )
  })
}
