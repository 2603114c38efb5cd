// Coherent thin-film optics of the OLED stack (pure; not yet wired into the tracer).
export * from './complex'
export * from './stack'
export * from './dipole'
export * from './table'
