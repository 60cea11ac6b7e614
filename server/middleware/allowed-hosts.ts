import { isIP } from 'node:net'
import type { RequestHandler } from 'express'
import { MisdirectedRequestError } from '../errors/app-error'

/** The host name of a Host header, without port and IPv6 brackets, lower-cased. */
export function hostName(header: string | undefined): string {
  const host = (header ?? '').trim().toLowerCase()
  if (host.startsWith('[')) return host.slice(1, host.indexOf(']') > 0 ? host.indexOf(']') : undefined)
  const colon = host.lastIndexOf(':')
  return colon >= 0 && host.indexOf(':') === colon ? host.slice(0, colon) : host
}

/**
 * Answers only requests addressed to one of our own names. A name someone else points at this
 * server (DNS rebinding: their page, our server, their origin) would otherwise be served as if it
 * were the app's own, and the same-origin check takes the Host as one of our origins. An address
 * (127.0.0.1, a LAN IP) cannot be such a name, so requests addressed by IP pass; names must be
 * listed: PUBLIC_URL's, HOST, localhost and ALLOWED_HOSTS. The health routes answer every name,
 * for load balancers that probe by an internal one.
 */
export function allowedHosts(names: readonly string[]): RequestHandler {
  const allowed = new Set(names.map((n) => n.trim().toLowerCase()).filter(Boolean))
  return (req, _res, next) => {
    if (req.path === '/api/health' || req.path.startsWith('/api/health/')) return next()
    const name = hostName(req.get('host'))
    if (name && (isIP(name) !== 0 || allowed.has(name))) return next()
    throw new MisdirectedRequestError(
      `This server does not answer for "${name || '(no host)'}". Use the address the administrator gave you.`,
      { host: name },
    )
  }
}
