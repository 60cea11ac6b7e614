import { Router } from 'express'
import { z } from 'zod'
import { ProjectCreate, ProjectListQuery, ProjectUpdate } from '../../shared/schemas/datasets'
import { requireUser } from '../middleware/auth'
import { validate } from '../middleware/validate'
import { createProjectFor, listProjectsFor, updateProjectFor } from '../services/projects.service'

const ProjectParams = z.object({ projectId: z.coerce.number().int().positive() })

/** /api/v1/projects — the projects that group a lab's datasets. */
export function projectsRoutes(): Router {
  const router = Router()
  router.use(requireUser)

  router.get('/', validate({ query: ProjectListQuery }), async (req, res) => {
    const { labId } = req.query as unknown as { labId?: number }
    res.json({ data: await listProjectsFor(req.user!, labId) })
  })

  router.post('/', validate({ body: ProjectCreate }), async (req, res) => {
    res.status(201).json({ data: await createProjectFor(req.user!, req.body) })
  })

  router.patch('/:projectId', validate({ params: ProjectParams, body: ProjectUpdate }), async (req, res) => {
    res.json({ data: await updateProjectFor(req.user!, Number(req.params.projectId), req.body) })
  })

  return router
}
