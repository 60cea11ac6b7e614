import AxeBuilder from '@axe-core/playwright'
import { expect, type Page, type TestInfo } from '@playwright/test'
import { mkdirSync, writeFileSync } from 'node:fs'
import { join } from 'node:path'

/** The rule sets checked: WCAG 2.0 and 2.1, levels A and AA. */
const TAGS = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa']
/** Impacts that fail a test; "moderate" and "minor" are reported but do not fail. */
const FAILING = new Set(['critical', 'serious'])

export interface PageCheck {
  page: string
  /** Violations by impact, counted per rule (not per element). */
  counts: Record<string, number>
  /** "rule (impact): n elements, first: selector" for every critical or serious rule. */
  failures: string[]
}

/**
 * Runs axe on the page as it is now (after the caller waited for its content) and returns what it
 * found; the caller collects the checks of several pages and fails once, so a run reports every
 * page's problems, not only the first page's.
 */
export async function checkPage(page: Page, name: string, testInfo: TestInfo): Promise<PageCheck> {
  // Let transitions and chart animations settle: colours mid-fade give false contrast readings.
  await page.waitForLoadState('networkidle')
  await page.waitForTimeout(600)
  const { violations } = await new AxeBuilder({ page }).withTags(TAGS).analyze()
  const counts: Record<string, number> = {}
  const failures: string[] = []
  for (const v of violations) {
    const impact = v.impact ?? 'unknown'
    counts[impact] = (counts[impact] ?? 0) + 1
    if (FAILING.has(impact)) {
      const first = v.nodes[0]?.target.join(' ') ?? ''
      failures.push(`${v.id} (${impact}): ${v.nodes.length} element(s), first: ${first}`)
    }
  }
  const check = { page: name, counts, failures }
  await testInfo.attach(`axe: ${name}`, {
    body: JSON.stringify({ ...check, violations }, null, 2),
    contentType: 'application/json',
  })
  console.log(`[axe] ${name}: ${JSON.stringify(counts)}`)
  // AXE_DUMP=folder writes every page's full findings there, for reading outside the report.
  if (process.env.AXE_DUMP) {
    mkdirSync(process.env.AXE_DUMP, { recursive: true })
    writeFileSync(
      join(process.env.AXE_DUMP, `${name.replace(/\W+/g, '-')}.json`),
      JSON.stringify(violations, null, 2),
    )
  }
  return check
}

/** Fails when any checked page has a critical or serious violation, listing them all. */
export function expectNoSeriousViolations(checks: PageCheck[]): void {
  const failing = checks.filter((c) => c.failures.length > 0)
  expect(
    failing.map((c) => `${c.page}:\n  ${c.failures.join('\n  ')}`).join('\n'),
    'critical or serious accessibility violations',
  ).toBe('')
}
