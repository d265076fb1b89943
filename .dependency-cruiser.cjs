/**
 * Who may import whom (the layers of the design): checked by `npm run check:layers`, which `npm test` runs.
 * HTTP layer = server/ outside server/core (app, routes, middlewares, demo, cli); back-end core = server/core.
 */
module.exports = {
  forbidden: [
    {
      name: 'no-cycles',
      severity: 'error',
      comment: 'An import cycle makes load order matter and hides which module owns what.',
      from: {},
      to: { circular: true },
    },
    {
      name: 'worker-not-http',
      severity: 'error',
      comment: 'The worker imports the back-end core and shared/, never the HTTP layer.',
      from: { path: '^worker/' },
      to: { path: '^server/', pathNot: '^server/core/' },
    },
    {
      name: 'core-not-http',
      severity: 'error',
      comment: 'The back-end core takes plain arguments; it knows nothing of Express, routes or middlewares.',
      from: { path: '^server/core/' },
      to: {
        path: ['^server/', '^node_modules/(express|multer|passport|express-session|cookie-parser)/'],
        pathNot: '^server/core/',
      },
    },
    {
      name: 'server-not-worker',
      severity: 'error',
      comment: 'Neither the core nor the HTTP layer reaches into the worker.',
      from: { path: '^server/' },
      to: { path: '^worker/' },
    },
    {
      name: 'client-only-shared',
      severity: 'error',
      comment: 'The client talks to the back end through /api only.',
      from: { path: '^src/' },
      to: { path: '^(server|worker)/' },
    },
    {
      name: 'shared-isomorphic',
      severity: 'error',
      comment: 'shared/ runs in the browser and in Node: no Node built-ins, no DOM or Vue, no other layer.',
      from: { path: '^shared/' },
      to: {
        path: ['^(src|server|worker|tests|bench)/', '^node_modules/(?!zod/)'],
      },
    },
    {
      name: 'shared-no-node-builtins',
      severity: 'error',
      from: { path: '^shared/' },
      to: { dependencyTypes: ['core'] },
    },
    {
      name: 'pure-computation-no-io',
      severity: 'error',
      comment: 'Estimators and signals are pure functions over typed arrays: no I/O, no database, no packages.',
      from: { path: '^worker/(motion|signals)/' },
      to: { path: ['^server/', '^worker/(jobs|pipeline|pool|runtime|pairsets)/', '^node_modules/'] },
    },
    {
      name: 'pure-computation-no-builtins',
      severity: 'error',
      from: { path: '^worker/(motion|signals)/' },
      to: { dependencyTypes: ['core'] },
    },
    {
      name: 'production-not-tests',
      severity: 'error',
      from: { path: '^(src|server|worker|shared)/' },
      to: { path: '^(tests|bench)/' },
    },
    {
      name: 'resolvable',
      severity: 'error',
      from: {},
      to: { couldNotResolve: true },
    },
  ],
  options: {
    doNotFollow: { path: 'node_modules' },
    tsPreCompilationDeps: true,
    tsConfig: { fileName: 'tsconfig.json' },
    enhancedResolveOptions: {
      exportsFields: ['exports'],
      conditionNames: ['import', 'require', 'node', 'default'],
      extensions: ['.ts', '.mjs', '.js', '.vue', '.json'],
    },
    exclude: { path: '(^|/)(node_modules|dist)/' },
  },
};
