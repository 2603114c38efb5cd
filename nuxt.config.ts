import { fileURLToPath } from 'node:url'
import { PALETTE } from './app/utils/palette'
// Lensfield: Nuxt 4 configuration, set up by hand.
// The Tailwind theme lives here (no tailwind.config at the top level): Lensfield's own palette (app/utils/palette.ts)
// and type scale.
export default defineNuxtConfig({
  compatibilityDate: '2026-11-01',
  // Build files inside the checkout: Nuxt 4's default (node_modules/.cache/nuxt) is shared by every worktree whose
  // node_modules is a symlink to one install, so parallel builds overwrote each other and relative imports from
  // app/ into shared/ resolved against the wrong checkout.
  buildDir: '.nuxt',
  modules: ['@pinia/nuxt', '@nuxtjs/tailwindcss', '@nuxt/eslint'],
  css: ['~/assets/css/main.css'],
  devtools: { enabled: false },
  telemetry: false,
  typescript: { strict: true },
  nitro: {
    routeRules: {
      // On every response (pages, API, assets); pages also get a nonce-based CSP (server/plugins/security-headers.ts).
      '/**': { headers: { 'X-Frame-Options': 'DENY', 'X-Content-Type-Options': 'nosniff', 'Referrer-Policy': 'same-origin' } },
    },
    hooks: {
      // The piscina pool loads its task file by path, so the production build carries the trace worker compiled
      // to plain JS beside the server entry (.output/server/workers/trace.mjs); piscina stays an external package.
      async compiled(nitro) {
        const { buildTraceWorker } = await import('./scripts/build-workers.mjs')
        await buildTraceWorker(`${nitro.options.output.serverDir}/workers/trace.mjs`)
      },
    },
  },
  // Production builds use Nitro's node-server entry with connection limits added (server/entry/node-server.ts).
  $production: {
    nitro: { entry: fileURLToPath(new URL('./server/entry/node-server.ts', import.meta.url)) },
  },
  runtimeConfig: {
    // NUXT_PUBLIC_DEMO_MODE=true (set by npm start / npm run dev) lists the demo accounts on the sign-in page.
    public: { demoMode: false },
  },
  app: {
    head: {
      title: 'Lensfield',
      htmlAttrs: { lang: 'en' },
      meta: [{ name: 'description', content: 'Lens-film design for OLED light extraction' }],
      link: [{ rel: 'icon', type: 'image/svg+xml', href: '/favicon.svg' }],
    },
  },
  tailwindcss: {
    exposeConfig: false,
    viewer: false,
    config: {
      theme: {
        extend: {
          // ink, paper, rule, ember, lagoon, alert: app/utils/palette.ts, shared with the charts.
          colors: PALETTE,
          fontFamily: {
            sans: ['"Source Sans 3"', 'system-ui', 'sans-serif'],
            mono: ['ui-monospace', 'SFMono-Regular', 'Menlo', 'monospace'],
          },
          // A 1.2 ratio scale from 13 px; names say what the size is for.
          fontSize: {
            note: ['0.8125rem', { lineHeight: '1.15rem' }],
            body: ['0.9375rem', { lineHeight: '1.4rem' }],
            lede: ['1.125rem', { lineHeight: '1.6rem' }],
            heading: ['1.35rem', { lineHeight: '1.8rem', fontWeight: '600' }],
            title: ['1.62rem', { lineHeight: '2.1rem', fontWeight: '600' }],
            banner: ['1.944rem', { lineHeight: '2.4rem', fontWeight: '600' }],
          },
          borderRadius: { panel: '6px' },
        },
      },
    },
  },
})
