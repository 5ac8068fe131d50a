// @nuxt/eslint: the Nuxt-aware recommended rules (TypeScript, Vue), run by `npm run lint` and by `npm test`.
import withNuxt from './.nuxt/eslint.config.mjs'

export default withNuxt(
  { ignores: ['server/eclipse/data/**', 'shared/eclipse/deltaTData.ts', 'public/sw.js'] },
  // Untyped npm packages are described in server/types/*.d.ts and referenced where they are used.
  { rules: { '@typescript-eslint/triple-slash-reference': 'off' } },
  // Tests read loosely typed JSON from the API on purpose.
  { files: ['tests/**', 'e2e/**'], rules: { '@typescript-eslint/no-explicit-any': 'off' } },
)
