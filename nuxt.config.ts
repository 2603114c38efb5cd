// Lensfield: Nuxt 4 configuration, set up by hand.
export default defineNuxtConfig({
  compatibilityDate: '2026-11-01',
  modules: ['@pinia/nuxt', '@nuxtjs/tailwindcss'],
  css: ['~/assets/css/main.css'],
  devtools: { enabled: false },
  telemetry: false,
  typescript: { strict: true },
})
