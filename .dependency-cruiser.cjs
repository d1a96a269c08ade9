/**
 * The walls between layers, checked on every `npm run lint` (dependency-cruiser reads the imports
 * of every source file, type-only ones included, and resolves `@/` through tsconfig.json).
 */
const SOURCES =
  '^(app|screens|components|hooks|lib|constants|offline|checklists|shared|demo|server|scripts|bench|tests)/';
module.exports = {
  forbidden: [
    {
      name: 'no-cycle',
      severity: 'error',
      comment: 'Modules import each other in one direction only.',
      from: { path: SOURCES },
      to: { circular: true },
    },
    {
      name: 'shared-is-pure',
      severity: 'error',
      comment: 'shared/ imports only shared/ and its npm libraries (no Node built-ins).',
      from: { path: '^shared/' },
      to: { pathNot: ['^shared/', '^node_modules/'] },
    },
    {
      name: 'shared-no-node-builtins',
      severity: 'error',
      comment: 'shared/ runs on the phone too: no Node built-ins.',
      from: { path: '^shared/' },
      to: { dependencyTypes: ['core'] },
    },
    {
      name: 'app-not-server',
      severity: 'error',
      comment: 'The app (routes, screens, components, hooks, lib, offline) never imports server/ code.',
      from: { path: '^(app|screens|components|hooks|lib|constants|offline)/' },
      to: { path: '^server/' },
    },
    {
      name: 'checklists-on-shared-only',
      severity: 'error',
      comment: 'Route templates as data depend on shared/ and nothing else of the project.',
      from: { path: '^checklists/' },
      to: { pathNot: ['^checklists/', '^shared/', '^node_modules/'] },
    },
    {
      name: 'offline-not-hooks',
      severity: 'error',
      comment: 'The device store and sync client sit below hooks/; hooks may use offline/, never the reverse.',
      from: { path: '^offline/' },
      to: { path: '^hooks/' },
    },
    {
      name: 'hooks-below-screens',
      severity: 'error',
      comment: 'hooks/ serve screens and routes; they never import them.',
      from: { path: '^hooks/' },
      to: { path: '^(app|screens)/' },
    },
    {
      name: 'engine-not-demo',
      severity: 'error',
      comment: 'Demo data (demo/) is for the seed, tests and benchmarks; engine and app code never import it.',
      from: {
        path: '^(app|screens|components|hooks|lib|constants|offline|checklists|shared|server)/',
        pathNot: '^server/(seed|cli)/',
      },
      to: { path: '^demo/' },
    },
    {
      name: 'no-unresolved',
      severity: 'error',
      comment: 'Every import resolves to a file or an installed package.',
      from: { path: SOURCES },
      to: { couldNotResolve: true },
    },
  ],
  options: {
    doNotFollow: { path: 'node_modules' },
    exclude: { path: '^(node_modules|dist|\\.data|\\.tmp|\\.expo|coverage)/' },
    tsPreCompilationDeps: true,
    tsConfig: { fileName: 'tsconfig.json' },
    enhancedResolveOptions: {
      extensions: ['.ts', '.tsx', '.web.ts', '.web.tsx', '.js', '.mjs', '.cjs', '.json', '.d.ts'],
      exportsFields: ['exports'],
      conditionNames: ['import', 'require', 'node', 'default', 'types'],
    },
    reporterOptions: { text: { highlightFocused: true } },
  },
};
