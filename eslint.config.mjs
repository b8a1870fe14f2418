import { createConfigForNuxt } from '@nuxt/eslint-config/flat'

export default createConfigForNuxt({
  features: { stylistic: true, tooling: false },
}).append(
  { ignores: ['.output/**', '.nuxt/**', 'node_modules/**', 'uploads/**', 'data/**', 'server/db/migrations/**', 'test-results/**', '.bench/**'] },
  {
    rules: {
      'vue/multi-word-component-names': 'off',
      '@typescript-eslint/no-explicit-any': 'off',
      'vue/max-attributes-per-line': 'off',
      'vue/singleline-html-element-content-newline': 'off',
      'vue/html-self-closing': 'off',
      'vue/first-attribute-linebreak': 'off',
      'vue/html-closing-bracket-newline': 'off',
      'vue/multiline-html-element-content-newline': 'off',
      '@stylistic/max-statements-per-line': 'off',
      '@stylistic/brace-style': 'off',
    },
  },
)
