// Mutation testing (StrykerJS 9.6 + the Vitest runner), one folder per run: `npm run mutate`
// runs all three in turn, `npm run mutate:plan` (or :driver, :thermal) one. Each folder keeps its
// incremental results in stryker/incremental-<folder>.json (committed), so a later run tests only
// the mutants whose code or covering tests changed. Slow on two cores: run it in the background,
// never in CI. Results and surviving mutants: stryker/README.md.
const folders = {
  plan: { mutate: ['shared/plan/**/*.ts'], tests: ['test/shared/plan/**/*.test.ts'] },
  driver: { mutate: ['shared/physics/driver/**/*.ts'], tests: ['test/shared/physics/driver/**/*.test.ts'] },
  thermal: { mutate: ['shared/physics/thermal/**/*.ts'], tests: ['test/shared/physics/thermal/**/*.test.ts', 'test/shared/physics/driver/**/*.test.ts'] },
};
const name = process.env.MUTATE_FOLDER ?? 'plan';
const folder = folders[name];
if (!folder) throw new Error(`MUTATE_FOLDER must be one of ${Object.keys(folders).join(', ')}, got ${name}`);
process.env.STRYKER_TESTS = JSON.stringify(folder.tests);

/** @type {import('@stryker-mutator/api/core').PartialStrykerOptions} */
export default {
  testRunner: 'vitest',
  vitest: { configFile: 'stryker/vitest.config.ts', related: false },
  mutate: [...folder.mutate, '!**/index.ts'],
  coverageAnalysis: 'perTest',
  ignoreStatic: true,
  incremental: true,
  incrementalFile: `stryker/incremental-${name}.json`,
  concurrency: 1,
  timeoutMS: 10000,
  reporters: ['clear-text', 'progress', 'json'],
  jsonReporter: { fileName: `stryker/report-${name}.json` },
  tempDirName: '.stryker-tmp',
  cleanTempDir: 'always',
};
