import type { Role } from '../../shared/schemas/auth'

/** The demo scenario's people and labs. Invented; the password is for demos only. */
export const demoPassword = 'nestwise-demo'

export interface DemoLab {
  slug: string
  name: string
}

export const demoLabs: DemoLab[] = [
  { slug: 'nimbus-neurite-lab', name: 'Nimbus Neurite Lab' },
  { slug: 'fernhill-culture-lab', name: 'Fernhill Culture Lab' },
]

export interface DemoAccount {
  email: string
  name: string
  isAdmin: boolean
  memberships: { labSlug: string; role: Role }[]
  /** One line for the start script's welcome text. */
  description: string
}

export const demoAccounts: DemoAccount[] = [
  {
    email: 'orla@example.org',
    name: 'Orla Quill',
    isAdmin: true,
    memberships: [],
    description: 'Orla Quill, instance admin (no lab)',
  },
  {
    email: 'petra@example.org',
    name: 'Petra Nimbus',
    isAdmin: false,
    memberships: [{ labSlug: 'nimbus-neurite-lab', role: 'pi' }],
    description: 'Petra Nimbus, PI of Nimbus Neurite Lab',
  },
  {
    email: 'sami@example.org',
    name: 'Sami Reed',
    isAdmin: false,
    memberships: [{ labSlug: 'nimbus-neurite-lab', role: 'scientist' }],
    description: 'Sami Reed, scientist in Nimbus Neurite Lab',
  },
  {
    email: 'theo@example.org',
    name: 'Theo Lark',
    isAdmin: false,
    memberships: [{ labSlug: 'nimbus-neurite-lab', role: 'scientist' }],
    description: 'Theo Lark, scientist in Nimbus Neurite Lab',
  },
  {
    email: 'bea@example.org',
    name: 'Bea Stone',
    isAdmin: false,
    memberships: [
      { labSlug: 'nimbus-neurite-lab', role: 'biostatistician' },
      { labSlug: 'fernhill-culture-lab', role: 'biostatistician' },
    ],
    description: 'Bea Stone, biostatistician for both labs',
  },
  {
    email: 'hugo@example.org',
    name: 'Hugo Fern',
    isAdmin: false,
    memberships: [{ labSlug: 'fernhill-culture-lab', role: 'pi' }],
    description: 'Hugo Fern, PI of Fernhill Culture Lab',
  },
]
