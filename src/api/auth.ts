import type { CurrentUser, LoginRequest } from '../../shared/schemas/auth'
import { request } from './http'

/** Who is signed in, or null: asked without a 401 for nobody (the sign-in page, a read-only link). */
export function fetchCurrentUser(): Promise<CurrentUser | null> {
  return request<CurrentUser | null>('/api/v1/auth/session', { skipUnauthenticatedHandler: true })
}

export function login(credentials: LoginRequest): Promise<CurrentUser> {
  return request<CurrentUser>('/api/v1/auth/login', {
    method: 'POST',
    body: credentials,
    skipUnauthenticatedHandler: true,
  })
}

export function logout(): Promise<void> {
  return request<void>('/api/v1/auth/logout', { method: 'POST', skipUnauthenticatedHandler: true })
}
