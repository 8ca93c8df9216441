// Three projects: node-side code (engine, server, worker) through ts-jest,
// the app's components through jest-expo, and browser end-to-end runs that
// need the whole stack (started by tests/run.sh, so they run last and alone).
const tsJest = [
  'ts-jest',
  {
    isolatedModules: true,
    tsconfig: { module: 'commonjs', moduleResolution: 'node10', target: 'ES2022', esModuleInterop: true, types: ['jest', 'node'], ignoreDeprecations: '6.0', rootDir: '.' },
  },
];

// The CSV parser's browser build is an ES module; Jest takes its CommonJS build.
const csvParseCjs = { '^csv-parse/browser/esm/sync$': '<rootDir>/node_modules/csv-parse/dist/cjs/sync.cjs' };

module.exports = {
  projects: [
    {
      displayName: 'node',
      testEnvironment: 'node',
      roots: ['<rootDir>/tests'],
      testMatch: ['<rootDir>/tests/{engine,galaxy,server,worker}/**/*.test.ts'],
      setupFiles: ['<rootDir>/tests/support/env.ts'],
      transform: { '^.+\\.ts$': tsJest },
      moduleNameMapper: csvParseCjs,
      moduleFileExtensions: ['ts', 'js', 'json'],
    },
    {
      displayName: 'app',
      preset: 'jest-expo/web',
      // d3-scale and its helpers resolve to ES modules; Jest takes their CommonJS builds instead.
      moduleNameMapper: { '^(d3-[a-z-]+|internmap)$': '<rootDir>/node_modules/$1/dist/$1.js', ...csvParseCjs },
      roots: ['<rootDir>/tests'],
      testMatch: ['<rootDir>/tests/app/**/*.test.tsx'],
    },
    {
      // Stops and restarts PostgreSQL and Redis, so it runs alone, after the node project (tests/run.sh).
      displayName: 'faults',
      testEnvironment: 'node',
      roots: ['<rootDir>/tests'],
      testMatch: ['<rootDir>/tests/faults/**/*.test.ts'],
      setupFiles: ['<rootDir>/tests/support/env.ts'],
      transform: { '^.+\\.ts$': tsJest },
      moduleNameMapper: csvParseCjs,
    },
    {
      displayName: 'e2e',
      testEnvironment: 'node',
      roots: ['<rootDir>/tests'],
      testMatch: ['<rootDir>/tests/e2e/**/*.test.ts'],
      transform: { '^.+\\.ts$': tsJest },
    },
  ],
};
