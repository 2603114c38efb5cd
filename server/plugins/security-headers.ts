// Security headers. Every response: no framing, no MIME sniffing, same-origin referrers (route rules in
// nuxt.config.ts). Pages additionally get a Content-Security-Policy without 'unsafe-inline' for scripts: the few
// inline scripts Nuxt writes (payload, config) carry a per-response nonce. Styles keep 'unsafe-inline', which Vue's
// style bindings and the chart library need. Development (Vite's hot reload injects scripts) gets no CSP.
import { randomBytes } from 'node:crypto'

export function contentSecurityPolicy(nonce: string): string {
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}'`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self'",
    "connect-src 'self'",
    "worker-src 'self' blob:",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ].join('; ')
}

const SCRIPT_TAG = /<script(?![^>]*\bnonce=)/g

export default defineNitroPlugin((nitroApp) => {
  if (process.env.NODE_ENV === 'development') return
  nitroApp.hooks.hook('render:html', (html, { event }) => {
    const nonce = randomBytes(16).toString('base64')
    const add = (parts: string[]) => parts.map((p) => p.replace(SCRIPT_TAG, `<script nonce="${nonce}"`))
    html.head = add(html.head)
    html.bodyPrepend = add(html.bodyPrepend)
    html.body = add(html.body)
    html.bodyAppend = add(html.bodyAppend)
    setResponseHeader(event, 'Content-Security-Policy', contentSecurityPolicy(nonce))
  })
})
