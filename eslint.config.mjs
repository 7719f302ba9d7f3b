import nextVitals from 'eslint-config-next/core-web-vitals';
import nextTs from 'eslint-config-next/typescript';
import tseslint from 'typescript-eslint';

const config = [
  { ignores: ['.next/**', 'node_modules/**', 'data/**', 'drizzle/**', 'next-env.d.ts'] },
  ...nextVitals,
  ...nextTs,
  {
    files: ['**/*.ts', '**/*.tsx'],
    languageOptions: {
      parser: tseslint.parser,
      parserOptions: { projectService: true, tsconfigRootDir: import.meta.dirname },
    },
    plugins: { '@typescript-eslint': tseslint.plugin },
    rules: {
      '@typescript-eslint/no-floating-promises': 'error',
      '@typescript-eslint/no-misused-promises': 'error',
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
    },
  },
  {
    // one rule for dates (lib/dates.ts): UTC, said so; a time written in the runtime's own zone or locale reads
    // differently on the server and in the browser (a hydration error) and differently from the PDF and the mail
    files: ['app/**/*.{ts,tsx}', 'components/**/*.{ts,tsx}', 'lib/**/*.{ts,tsx}', 'workers/**/*.ts'],
    rules: {
      'no-restricted-syntax': ['error',
        { selector: "CallExpression[callee.property.name=/^toLocale(Date|Time)String$/]", message: 'Show an instant with formatUtc / formatUtcDay (lib/dates.ts).' },
        { selector: "CallExpression[callee.property.name='toLocaleString']:not([arguments.0.type='Literal'])", message: 'Name the locale (numbers), or show an instant with formatUtc (lib/dates.ts).' },
        { selector: "CallExpression[callee.property.name='toLocaleString'] Property[key.name=/^(dateStyle|timeStyle|timeZone|year|month|day|hour|minute)$/]", message: 'Show an instant with formatUtc / formatUtcDay (lib/dates.ts).' },
        { selector: "NewExpression[callee.object.name='Intl'][callee.property.name='DateTimeFormat']", message: 'Show an instant with formatUtc / formatUtcDay (lib/dates.ts).' },
      ],
    },
  },
];

export default config;
