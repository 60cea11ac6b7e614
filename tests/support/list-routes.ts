import type { Express } from 'express'

export interface AppRoute {
  method: string
  path: string
}

// Express 5 (router 2.x): a layer made by app.use(path, router) keeps the mount path in `rawPath`
// and the sub-router in `handle` (which has its own `stack`); a layer made by router.get(...)
// carries `route` with `path` and `methods`. Only string paths are supported: a RegExp or array
// mount would be reported, not silently skipped.
interface Layer {
  rawPath?: unknown
  handle?: { stack?: Layer[] }
  route?: { path: unknown; methods: Record<string, boolean> }
}

function join(prefix: string, path: string): string {
  const joined = `${prefix}/${path}`.replace(/\/{2,}/g, '/')
  return joined.length > 1 ? joined.replace(/\/$/, '') : joined
}

function walk(stack: Layer[], prefix: string, out: AppRoute[]): void {
  for (const layer of stack) {
    if (layer.route) {
      if (typeof layer.route.path !== 'string')
        throw new Error(`route with a non-string path under ${prefix}`)
      const methods = Object.keys(layer.route.methods).filter((m) => m !== '_all')
      if (layer.route.methods._all) methods.push('ALL')
      for (const method of methods)
        out.push({ method: method.toUpperCase(), path: join(prefix, layer.route.path) })
    } else if (layer.handle?.stack) {
      const mount = layer.rawPath ?? '/'
      if (typeof mount !== 'string') throw new Error(`router mounted at a non-string path under ${prefix}`)
      walk(layer.handle.stack, join(prefix, mount), out)
    }
  }
}

/** Every route the app answers, as "METHOD /full/path", from the router stack. */
export function listRoutes(app: Express): AppRoute[] {
  const out: AppRoute[] = []
  walk((app as unknown as { router: { stack: Layer[] } }).router.stack, '', out)
  return out
}
