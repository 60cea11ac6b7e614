import 'vue-router'
import type { Role } from '../../shared/schemas/auth'

declare module 'vue-router' {
  interface RouteMeta {
    /** Reachable without signing in. */
    public?: boolean
    /** The user needs at least one of these roles in some lab. */
    roles?: Role[]
    /** Only for instance admins. */
    admin?: boolean
    /** Page title (browser tab and app bar). */
    title?: string
    /** false: the page draws its own full-screen layout (sign-in). */
    shell?: boolean
  }
}
