import type { Role } from '../schemas/auth'
import { WRITER_ROLES } from './roles'

/** What a writing role is needed for, per kind of record, as the start of a refusal. */
export const WRITE_ACTIONS = {
  dataset: 'Uploading, tagging and excluding rows need',
  analysis: 'Creating and running analyses needs',
  plan: 'Saving, changing and deleting plans needs',
  project: 'Creating and renaming projects needs',
  review: 'Asking for a review needs',
} as const

export type WriteSubject = keyof typeof WRITE_ACTIONS

const ROLE_WORDS: Record<Role, string> = {
  scientist: 'scientist',
  pi: 'PI',
  biostatistician: 'biostatistician',
}

/** "Saving, changing and deleting plans needs the role scientist or PI in Nimbus Neurite Lab." */
export function writeRefusal(subject: WriteSubject, labName: string): string {
  return `${WRITE_ACTIONS[subject]} the role ${WRITER_ROLES.map((r) => ROLE_WORDS[r]).join(' or ')} in ${labName}.`
}
