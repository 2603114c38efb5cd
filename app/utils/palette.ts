// Lensfield's palette, the one source for Tailwind's theme (nuxt.config.ts tailwindcss.config) and for the colours
// that charts, the 3-D view and canvas drawings set in code.
// "ink": deep blue-grey for text and the header; "paper" surfaces; "rule" hairlines and borders; "ember": the warm
// accent of an emitting tile; "lagoon": the cool accent for links and focus; "alert": errors and broken limits.
export const PALETTE = {
  ink: { DEFAULT: '#17202b', soft: '#3a4656', muted: '#64707f' },
  paper: { DEFAULT: '#f6f5f1', raised: '#ffffff', sunk: '#ebe9e2' },
  rule: { DEFAULT: '#d8d5cc', strong: '#b9b5aa' },
  ember: { 50: '#fdf4e7', 200: '#f6d39a', 500: '#d9892b', 600: '#b86d18', 800: '#6e3f0b' },
  lagoon: { 50: '#e8f3f3', 200: '#a9d3d2', 500: '#2b8584', 600: '#1f6b6a', 800: '#123f3f' },
  alert: { 50: '#fbeceb', 500: '#b43c32', 700: '#85261f' },
} as const

/** Series colours of charts, in order: this design, the flat device / second item, a third, a fourth. */
export const SERIES_COLOURS = [PALETTE.ember[600], PALETTE.lagoon[600], PALETTE.ink.DEFAULT, PALETTE.alert[700]] as const

/** The sweep heat map's ramp, light to dark (lagoon). */
export const HEAT_RAMP = [PALETTE.lagoon[50], PALETTE.lagoon[200], PALETTE.lagoon[500], PALETTE.lagoon[800]] as const
