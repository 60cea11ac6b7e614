import type { CurrentUser } from '../../shared/schemas/auth'

// Invented people matching the demo seed's shape, for component and store tests.
export const petraPi: CurrentUser = {
  id: 2,
  email: 'petra@example.org',
  name: 'Petra Nimbus',
  isAdmin: false,
  memberships: [{ labId: 1, labName: 'Nimbus Neurite Lab', role: 'pi' }],
}

export const samiScientist: CurrentUser = {
  id: 3,
  email: 'sami@example.org',
  name: 'Sami Reed',
  isAdmin: false,
  memberships: [{ labId: 1, labName: 'Nimbus Neurite Lab', role: 'scientist' }],
}

export const beaBiostatistician: CurrentUser = {
  id: 5,
  email: 'bea@example.org',
  name: 'Bea Stone',
  isAdmin: false,
  memberships: [
    { labId: 1, labName: 'Nimbus Neurite Lab', role: 'biostatistician' },
    { labId: 2, labName: 'Fernhill Culture Lab', role: 'biostatistician' },
  ],
}

export const orlaAdmin: CurrentUser = {
  id: 1,
  email: 'orla@example.org',
  name: 'Orla Quill',
  isAdmin: true,
  memberships: [],
}

export const nellNoLab: CurrentUser = {
  id: 9,
  email: 'nell@example.org',
  name: 'Nell Vane',
  isAdmin: false,
  memberships: [],
}

export const allTestUsers = [petraPi, samiScientist, beaBiostatistician, orlaAdmin, nellNoLab]
