import type { RouteLocationRaw } from 'vue-router'
import type { AnalysisListItem } from '../../../shared/schemas/analyses'
import type { CurrentUser } from '../../../shared/schemas/auth'
import type { DatasetSummary } from '../../../shared/schemas/datasets'
import type { ReviewRequest } from '../../../shared/schemas/reviews'
import { ledLabs, writableLabs } from '../../../shared/access'
import { unitAdequacy } from '@/components/dataset/unit-badge'

export interface NextStep {
  id:
    | 'upload-first-table'
    | 'read-lab-datasets'
    | 'join-a-lab'
    | 'instance-admin'
    | 'reviews-waiting'
    | 'nesting-not-saved'
    | 'results-to-read'
    | 'badges-need-attention'
    | 'nothing-waiting'
  icon: string
  title: string
  text: string
  /** A button appears only when this route exists: steps name a destination before it is built. */
  action?: { label: string; routeName: string }
  /** The things the step is about, each a link (at most a few; the action leads to the rest). */
  items?: { key: string; text: string; to: RouteLocationRaw }[]
}

/** The upload page's route name (src/router/routes.ts). */
export const UPLOAD_ROUTE_NAME = 'dataset-upload'
export const DATASETS_ROUTE_NAME = 'datasets'

/** What a signed-in person should do first, in plain words, when there is nothing to show yet. */
export function nextStepFor(user: CurrentUser): NextStep {
  if (writableLabs(user).length > 0) {
    return {
      id: 'upload-first-table',
      icon: 'mdi-table-arrow-up',
      title: 'Upload a per-cell table to start',
      text:
        'Export one row per cell (or well) from your imaging or plate-reader software, with columns ' +
        'that say which animal, culture, plate or day each row came from. Nestwise suggests how ' +
        'these units are nested and then analyses at the level of independent units.',
      action: { label: 'Upload a table', routeName: UPLOAD_ROUTE_NAME },
    }
  }
  // Biostatisticians review what scientists and PIs upload; they do not upload themselves.
  if (user.memberships.length > 0) {
    return {
      id: 'read-lab-datasets',
      icon: 'mdi-table-search',
      title: 'See what your labs have uploaded',
      text:
        'Scientists and PIs of your labs upload per-cell tables and say how their units are nested. ' +
        'You can read each table, its nesting and what was left out, and why.',
      action: { label: 'See datasets', routeName: DATASETS_ROUTE_NAME },
    }
  }
  if (user.isAdmin) {
    return {
      id: 'instance-admin',
      icon: 'mdi-shield-account-outline',
      title: 'You run this instance',
      text:
        'You are not a member of any lab, so there are no datasets or analyses to show you. ' +
        'Labs, people and roles are yours to look after.',
    }
  }
  return {
    id: 'join-a-lab',
    icon: 'mdi-account-clock-outline',
    title: 'You are not in a lab yet',
    text:
      'Datasets and analyses belong to labs. Ask the admin of this Nestwise instance to add you ' +
      'to your lab; you can then upload tables and see the lab’s analyses.',
  }
}

/** What the overview knows about the person's labs; null where it could not be loaded. */
export interface OverviewFacts {
  datasets: DatasetSummary[] | null
  analyses: AnalysisListItem[] | null
  /** Open review requests addressed to the person. */
  reviews: ReviewRequest[] | null
}

/** How many things a step lists before "and n more". */
const LISTED = 4

function plural(n: number, one: string, many: string): string {
  return `${n} ${n === 1 ? one : many}`
}

/**
 * The person's next steps, by role, from what is waiting in their labs: reviews addressed to a
 * biostatistician; for a scientist or PI, tables whose nesting is not saved and their newest
 * results to read; for a PI, results whose independent units are few (the unit badge's rule,
 * common practice). Only when none of that applies does the first-time step show (upload a table,
 * read the lab's datasets, …), and only when the labs really have no data yet.
 */
export function overviewSteps(user: CurrentUser, facts: OverviewFacts): NextStep[] {
  const steps: NextStep[] = []
  const memberOf = new Set(user.memberships.map((m) => m.labId))
  const writable = new Set(writableLabs(user).map((m) => m.labId))
  const piLabs = new Set(ledLabs(user).map((m) => m.labId))

  const reviews = (facts.reviews ?? []).filter((r) => r.status === 'open')
  if (reviews.length) {
    steps.push({
      id: 'reviews-waiting',
      icon: 'mdi-check-decagram-outline',
      title: `${plural(reviews.length, 'review waits', 'reviews wait')} for you`,
      text: 'Read the model, the units and the warnings, then comment, ask for changes or sign off the version.',
      action: { label: 'Open reviews', routeName: 'reviews' },
      items: reviews.slice(0, LISTED).map((r) => ({
        key: `review-${r.id}`,
        text: `${r.analysisName}, version ${r.versionNo} (asked by ${r.requestedBy.name})`,
        to: {
          name: 'analysis',
          params: { analysisId: String(r.analysisId) },
          query: { version: String(r.versionNo) },
        },
      })),
    })
  }

  const untagged = (facts.datasets ?? []).filter(
    (d) => writable.has(d.labId) && d.latestVersion?.status === 'ready' && !d.latestVersion.tagged,
  )
  if (untagged.length) {
    steps.push({
      id: 'nesting-not-saved',
      icon: 'mdi-file-tree-outline',
      title: `Save the nesting of ${plural(untagged.length, 'table', 'tables')}`,
      text: 'Say what is nested in what (or take the suggestion): analyses need a saved nesting.',
      items: untagged.slice(0, LISTED).map((d) => ({
        key: `dataset-${d.id}`,
        text: d.name,
        to: { name: 'dataset', params: { datasetId: String(d.id) }, query: { tab: 'nesting' } },
      })),
    })
  }

  const analyses = facts.analyses ?? []
  const thin = analyses.filter(
    (a) =>
      piLabs.has(a.labId) &&
      a.latestVersion.status === 'done' &&
      a.latestVersion.headline?.minUnitsPerCondition != null &&
      unitAdequacy(a.latestVersion.headline.minUnitsPerCondition) !== 'adequate',
  )
  if (thin.length) {
    steps.push({
      id: 'badges-need-attention',
      icon: 'mdi-alert-outline',
      title: `${plural(thin.length, 'result rests', 'results rest')} on few independent units`,
      text: 'Fewer than 6 units in an arm (common practice, no source): look before the lab meeting, and plan the next experiment for power.',
      action: { label: 'Open the lab board', routeName: 'lab-board' },
      items: thin.slice(0, LISTED).map((a) => ({
        key: `thin-${a.id}`,
        text: `${a.name}: ${a.latestVersion.headline!.minUnitsPerCondition} units in the smallest arm`,
        to: { name: 'analysis', params: { analysisId: String(a.id) } },
      })),
    })
  }

  const mine = analyses
    .filter((a) => writable.has(a.labId) && a.createdBy.id === user.id && a.latestVersion.status === 'done')
    .sort((a, b) => (b.latestVersion.finishedAt ?? '').localeCompare(a.latestVersion.finishedAt ?? ''))
  if (mine.length) {
    steps.push({
      id: 'results-to-read',
      icon: 'mdi-chart-box-outline',
      title: 'Your newest results',
      text: 'Read each at the level of its independent units, export the figure and the methods text, or ask a biostatistician to review it.',
      action: { label: 'All analyses', routeName: 'analyses' },
      items: mine.slice(0, LISTED).map((a) => ({
        key: `result-${a.id}`,
        text: `${a.name}, version ${a.latestVersion.versionNo}`,
        to: { name: 'analysis', params: { analysisId: String(a.id) } },
      })),
    })
  }

  if (steps.length) return steps
  const loaded = facts.datasets !== null
  const hasData = (facts.datasets ?? []).some((d) => memberOf.has(d.labId))
  if (loaded && hasData) {
    return [
      {
        id: 'nothing-waiting',
        icon: 'mdi-check-circle-outline',
        title: 'Nothing waits for you',
        text: 'No review, nesting or thin result needs you now. Your labs’ datasets and analyses are one click away.',
        action: { label: 'See analyses', routeName: 'analyses' },
      },
    ]
  }
  return [nextStepFor(user)]
}
