import next from 'eslint-config-next';

const config = [
  ...next,
  { ignores: ['.next*/**', '.hotlap/**', 'node_modules/**', 'data/**', 'test-results/**', 'playwright-report/**', 'next-env.d.ts'] },
];

export default config;
