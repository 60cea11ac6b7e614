import type { RequestHandler } from 'express'
import helmet from 'helmet'

/**
 * helmet's headers with a Content-Security-Policy for the built Vue app: scripts, styles and fonts
 * from our own origin only (no CDN), data: images (chart exports, icons), and inline styles, which
 * Vuetify's theme and echarts set at run time.
 */
export function securityHeaders({ https }: { https: boolean }): RequestHandler {
  return helmet({
    contentSecurityPolicy: {
      useDefaults: false,
      directives: {
        defaultSrc: ["'self'"],
        scriptSrc: ["'self'"],
        styleSrc: ["'self'", "'unsafe-inline'"],
        fontSrc: ["'self'", 'data:'],
        imgSrc: ["'self'", 'data:', 'blob:'],
        connectSrc: ["'self'"],
        workerSrc: ["'self'", 'blob:'],
        objectSrc: ["'none'"],
        baseUri: ["'self'"],
        formAction: ["'self'"],
        frameAncestors: ["'none'"],
        scriptSrcAttr: ["'none'"],
        // Only behind https: over plain http on 127.0.0.1 it would break every asset request.
        ...(https ? { upgradeInsecureRequests: [] } : {}),
      },
    },
    // HSTS over plain http is ignored at best; send it only when the public address is https.
    strictTransportSecurity: https ? { maxAge: 15552000, includeSubDomains: false } : false,
  })
}
