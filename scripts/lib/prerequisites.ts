import { existsSync } from 'node:fs'
import { aptInstall, capture, commandExists } from './run'

/** Debian's Chromium drives the browser tests (Playwright cannot download its own browser here). */
export function ensureChromium(): void {
  if (!existsSync('/usr/bin/chromium')) aptInstall(['chromium'])
}

/** R with lme4 and lmerTest is the live reference the engine's results are checked against. */
export function ensureRReference(): void {
  const hasPackages = () =>
    commandExists('Rscript') &&
    capture('Rscript', ['-e', 'suppressMessages({library(lme4); library(lmerTest)})']) !== null
  if (!hasPackages()) aptInstall(['r-base-core', 'r-cran-lme4', 'r-cran-lmertest'], { noRecommends: true })
}
