// The tracing core's public surface (pure: no node:*, DOM, Vue or Nitro).
export * from './rng'
export * from './interfaces'
export * from './sampling'
export * from './geometry'
export * from './scene'
export * from './tally'
export * from './tracer'
export * from './run'
