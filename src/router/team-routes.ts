import type { RouteRecordRaw } from 'vue-router'

/** Labs, invitations, mail and the audit log. Same view for a PI's own lab and an admin's look at any lab. */
export const teamRoutes: RouteRecordRaw[] = [
  {
    // Invitation links land here (/join#token); reachable without an account.
    path: '/join',
    name: 'join-lab',
    component: () => import('@/views/JoinLabView.vue'),
    meta: { public: true, shell: false, title: 'Join a lab' },
  },
  {
    path: '/lab/members',
    name: 'lab-members',
    component: () => import('@/views/LabMembersView.vue'),
    meta: { roles: ['pi'], title: 'Lab members' },
  },
  {
    path: '/lab/audit',
    name: 'lab-audit',
    component: () => import('@/views/AuditLogView.vue'),
    props: { scope: 'lab' },
    meta: { roles: ['pi'], title: 'Audit log' },
  },
  {
    path: '/admin/people',
    name: 'admin-people',
    component: () => import('@/views/AdminPeopleView.vue'),
    meta: { admin: true, title: 'People & labs' },
  },
  {
    path: '/admin/labs/:labId(\\d+)',
    name: 'admin-lab',
    component: () => import('@/views/LabMembersView.vue'),
    meta: { admin: true, title: 'Lab members' },
  },
  {
    path: '/admin/outbox',
    name: 'admin-outbox',
    component: () => import('@/views/OutboxView.vue'),
    meta: { admin: true, title: 'Outbox' },
  },
  {
    path: '/admin/audit',
    name: 'admin-audit',
    component: () => import('@/views/AuditLogView.vue'),
    props: { scope: 'instance' },
    meta: { admin: true, title: 'Audit log' },
  },
]
