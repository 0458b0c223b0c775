import nextCoreWebVitals from 'eslint-config-next/core-web-vitals';
import nextTypescript from 'eslint-config-next/typescript';
import prettier from 'eslint-config-prettier/flat';

/** ESLint flat config: the Next.js rules (React, hooks, a11y, TypeScript), with Prettier owning layout. */
const config = [
  ...nextCoreWebVitals,
  ...nextTypescript,
  prettier,
  {
    rules: {
      '@typescript-eslint/no-unused-vars': [
        'warn',
        { argsIgnorePattern: '^_', varsIgnorePattern: '^_', destructuredArrayIgnorePattern: '^_' },
      ],
    },
  },
  {
    ignores: [
      '.next/**',
      'dist/**',
      'node_modules/**',
      'data/**',
      'test-results/**',
      'next-env.d.ts',
      'fixtures/**/*.json',
    ],
  },
];

export default config;
