import type { Role } from '../../shared/schemas/auth'

/** Role names and one plain sentence each, as shown on screen. */
export const roleWording: Record<Role, { label: string; summary: string }> = {
  scientist: {
    label: 'Scientist',
    summary: 'Uploads per-cell tables and analyses them at the level of independent units.',
  },
  pi: {
    label: 'PI (lab head)',
    summary: "Oversees the lab's analyses and which results rest on enough independent units.",
  },
  biostatistician: {
    label: 'Biostatistician',
    summary: 'Checks models and comparisons, comments, and signs off a version.',
  },
}

export const adminWording = {
  label: 'Instance admin',
  summary: 'Runs this Nestwise instance: labs, people, roles and mail settings.',
}
