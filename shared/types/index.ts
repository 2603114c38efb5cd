export * from './scenario'
export * from './geometry'
export * from './result'
export * from './thin-film'
