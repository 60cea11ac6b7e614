import type { CurrentUser, LoginRequest } from '../../shared/schemas/auth'
import { request } from './http'

export function fetchCurrentUser(): Promise<CurrentUser> {
  return request<CurrentUser>('/api/v1/auth/me', { skipUnauthenticatedHandler: true })
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
