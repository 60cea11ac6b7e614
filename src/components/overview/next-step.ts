import type { CurrentUser } from '../../../shared/schemas/auth'
import { writableLabs } from '../../../shared/access'

export interface NextStep {
  id: 'upload-first-table' | 'read-lab-datasets' | 'join-a-lab' | 'instance-admin'
  icon: string
  title: string
  text: string
  /** A button appears only when this route exists: steps name a destination before it is built. */
  action?: { label: string; routeName: string }
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
