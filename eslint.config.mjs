// ESLint (flat config) from @nuxt/eslint: its Vue, TypeScript and Nuxt rules for app/, server/, shared/ and the
// scripts; stylistic rules stay off (no reformatting), only a line-length ceiling. `npm run lint`; `npm test` runs it.
import './scripts/eslint-node20.mjs'
import withNuxt from './.nuxt/eslint.config.mjs'

export default withNuxt(
  {
    ignores: ['drizzle/**', '.output/**', '.data/**', 'test-output/**', 'public/**'],
  },
  {
    rules: {
      'max-len': ['error', {
        code: 160,
        ignoreUrls: true,
        ignoreStrings: true,
        ignoreTemplateLiterals: true,
        ignoreRegExpLiterals: true,
      }],
    },
  },
)
