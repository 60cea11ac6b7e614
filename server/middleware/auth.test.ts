import type { NextFunction, Request, Response } from 'express'
import { describe, expect, it, vi } from 'vitest'
import type { CurrentUser } from '../../shared/schemas/auth'
import { AppError } from '../errors/app-error'
import { requireAdmin, requireLabRole, requireUser } from './auth'

const pi: CurrentUser = {
  id: 7,
  email: 'p@example.test',
  name: 'P',
  isAdmin: false,
  memberships: [
    { labId: 1, labName: 'Alder Lab', role: 'pi' },
    { labId: 2, labName: 'Birch Lab', role: 'scientist' },
  ],
}
const admin: CurrentUser = { id: 8, email: 'a@example.test', name: 'A', isAdmin: true, memberships: [] }

function run(
  handler: (req: Request, res: Response, next: NextFunction) => void,
  user: CurrentUser | undefined,
  params = {},
) {
  const req = { user, params } as unknown as Request
  const next = vi.fn()
  try {
    handler(req, {} as Response, next)
  } catch (err) {
    if (err instanceof AppError) return { status: err.status, code: err.code }
    throw err
  }
  return next.mock.calls.length === 1 ? 'next' : 'stalled'
}

describe('requireUser / requireAdmin', () => {
  it('let signed-in users through and stop anonymous ones with 401', () => {
    expect(run(requireUser, pi)).toBe('next')
    expect(run(requireUser, undefined)).toEqual({ status: 401, code: 'UNAUTHENTICATED' })
  })

  it('admits only instance administrators to admin routes', () => {
    expect(run(requireAdmin, admin)).toBe('next')
    expect(run(requireAdmin, pi)).toEqual({ status: 403, code: 'FORBIDDEN' })
    expect(run(requireAdmin, undefined)).toEqual({ status: 401, code: 'UNAUTHENTICATED' })
  })
})

describe('requireLabRole', () => {
  it('admits a member whose role in that lab is listed', () => {
    expect(run(requireLabRole(['pi']), pi, { labId: '1' })).toBe('next')
    expect(run(requireLabRole(['pi', 'scientist']), pi, { labId: '2' })).toBe('next')
  })

  it('answers 403 for a member with another role: roles are per lab', () => {
    expect(run(requireLabRole(['pi']), pi, { labId: '2' })).toEqual({ status: 403, code: 'FORBIDDEN' })
  })

  it('answers 404 for a lab the user is not in, and for ids that are not numbers', () => {
    expect(run(requireLabRole('any'), pi, { labId: '3' })).toEqual({ status: 404, code: 'NOT_FOUND' })
    expect(run(requireLabRole('any'), pi, { labId: '1abc' })).toEqual({ status: 404, code: 'NOT_FOUND' })
  })

  it('admits any member with "any"', () => {
    expect(run(requireLabRole('any'), pi, { labId: '2' })).toBe('next')
  })

  it('lets administrators in only where allowed', () => {
    expect(run(requireLabRole('any'), admin, { labId: '1' })).toEqual({ status: 404, code: 'NOT_FOUND' })
    expect(run(requireLabRole('any', { allowAdmin: true }), admin, { labId: '1' })).toBe('next')
  })

  it('reads another parameter name when told', () => {
    expect(run(requireLabRole(['pi'], { param: 'id' }), pi, { id: '1' })).toBe('next')
  })

  it('answers 401 for anonymous callers', () => {
    expect(run(requireLabRole('any'), undefined, { labId: '1' })).toEqual({
      status: 401,
      code: 'UNAUTHENTICATED',
    })
  })
})
