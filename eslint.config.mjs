import withNuxt from './.nuxt/eslint.config.mjs'

// Node 20 lacks Object.groupBy (Node 21+), which the flat-config helpers call when composing.
if (!Object.groupBy) {
  Object.defineProperty(Object, 'groupBy', {
    configurable: true,
    writable: true,
    value: (items, key) => {
      const groups = Object.create(null)
      let i = 0
      for (const item of items) (groups[key(item, i++)] ??= []).push(item)
      return groups
    },
  })
}

export default withNuxt({
  ignores: ['.local/**', '.output/**', '.nuxt/**'],
})
