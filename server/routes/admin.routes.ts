import { Router } from 'express'
import { AuditQuery } from '../../shared/schemas/audit'
import { LabCreate } from '../../shared/schemas/labs'
import { MailIdParams, MailListQuery } from '../../shared/schemas/mail'
import { requireAdmin } from '../middleware/auth'
import { validate } from '../middleware/validate'
import { listInstanceAudit } from '../services/audit.service'
import { createLab } from '../services/labs.service'
import {
  getReceivedMail,
  listOutboxPage,
  listReceivedPage,
  mailDelivery,
  retryOutboxMessage,
} from '../services/mail-admin.service'
import { listUsersWithMemberships } from '../services/users.service'

/** /api/v1/admin: instance administration (people, labs, roles, mail, audit). Admins only. */
export function adminRoutes(): Router {
  const router = Router()
  router.use(requireAdmin)
  router.use((_req, res, next) => {
    res.setHeader('Cache-Control', 'no-store')
    next()
  })

  router.get('/users', async (_req, res) => {
    res.json({ data: await listUsersWithMemberships() })
  })

  router.post('/labs', validate({ body: LabCreate }), async (req, res) => {
    res.status(201).json({ data: await createLab(req.user!, req.body as LabCreate) })
  })

  router.get('/audit', validate({ query: AuditQuery }), async (req, res) => {
    res.json({ data: await listInstanceAudit(req.query as unknown as AuditQuery) })
  })

  router.get('/mail/delivery', (_req, res) => {
    res.json({ data: mailDelivery() })
  })

  router.get('/mail/outbox', validate({ query: MailListQuery }), async (req, res) => {
    res.json({ data: await listOutboxPage(req.query as unknown as MailListQuery) })
  })

  router.post('/mail/outbox/:mailId/retry', validate({ params: MailIdParams }), async (req, res) => {
    const { mailId } = req.params as unknown as MailIdParams
    res.json({ data: await retryOutboxMessage(req.user!, mailId) })
  })

  router.get('/mail/received', validate({ query: MailListQuery }), async (req, res) => {
    res.json({ data: await listReceivedPage(req.query as unknown as MailListQuery) })
  })

  router.get('/mail/received/:mailId', validate({ params: MailIdParams }), async (req, res) => {
    const { mailId } = req.params as unknown as MailIdParams
    res.json({ data: await getReceivedMail(mailId) })
  })

  return router
}
