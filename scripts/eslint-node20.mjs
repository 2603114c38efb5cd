// Node 20 lacks Object.groupBy (Node 21+), which eslint-flat-config-utils (under @nuxt/eslint) calls while it
// composes the config. Lensfield supports Node 20.19+, so eslint.config.mjs loads this first; a no-op on Node 22+.
if (typeof Object.groupBy !== 'function') {
  Object.defineProperty(Object, 'groupBy', {
    configurable: true,
    writable: true,
    value(items, keyOf) {
      const groups = Object.create(null)
      let index = 0
      for (const item of items) {
        const key = keyOf(item, index++)
        if (Object.hasOwn(groups, key)) groups[key].push(item)
        else groups[key] = [item]
      }
      return groups
    },
  })
}
