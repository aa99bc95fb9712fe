/**
 * Import rules the build enforces (`npm run lint:imports`, first step of `npm test`).
 * The layers and resources are described in DEVELOPERS.md ("Layers, one way").
 */
const NODE_AND_FRAMEWORKS = [
  '^(node:)?(fs|path|os|crypto|http|https|stream|child_process|worker_threads|url|util|zlib|buffer|events|net|tls|process)(/|$)',
  '^node_modules/(express|knex|better-sqlite3|pg|passport|multer|nodemailer|pino|react|react-dom|react-router|@tanstack|i18next|react-i18next|workbox-[^/]+|idb|idb-keyval|vite-plugin-pwa)/',
];

module.exports = {
  forbidden: [
    {
      name: 'shared-is-pure',
      comment: 'shared/ runs on the server and the phone: it imports nothing from server/ or client/.',
      severity: 'error',
      from: { path: '^shared/' },
      to: { path: '^(server|client)/' },
    },
    {
      name: 'shared-has-no-runtime',
      comment: 'shared/ imports no Node builtins, no express or knex, no React or browser libraries.',
      severity: 'error',
      from: { path: '^shared/' },
      to: { dependencyTypes: ['core'] },
    },
    {
      name: 'shared-has-no-frameworks',
      comment: 'shared/ imports no Node builtins, no express or knex, no React or browser libraries.',
      severity: 'error',
      from: { path: '^shared/' },
      to: { path: NODE_AND_FRAMEWORKS },
    },
    {
      name: 'resources-meet-through-public',
      comment:
        'A server resource uses another only through its public.ts (server/platform/ is for everyone); ' +
        'index.ts is what server/app.ts mounts.',
      severity: 'error',
      from: { path: '^server/([^/]+)/' },
      to: { path: '^server/[^/]+/', pathNot: ['^server/$1/', '^server/platform/', '^server/[^/]+/public\\.ts$'] },
    },
    {
      name: 'app-uses-resource-entries',
      comment: 'server/app.ts and main.ts take routers from each resource\'s index.ts, and anything else from platform/ or public.ts.',
      severity: 'error',
      from: { path: '^server/[^/]+\\.ts$' },
      to: { path: '^server/[^/]+/', pathNot: ['^server/platform/', '^server/[^/]+/(index|public)\\.ts$'] },
    },
    {
      name: 'routes-call-services',
      comment: 'Route and page files never import db modules: they call the resource\'s services.',
      severity: 'error',
      from: { path: '^server/.*(routes|pages)\\.ts$' },
      to: { path: '^server/.*(/db|-db)\\.ts$' },
    },
    {
      name: 'no-circular-server',
      comment: 'No import cycles in server/ (type-only imports count too).',
      severity: 'error',
      from: { path: '^server/' },
      to: { circular: true },
    },
    // The capture app: features meet through lib/, app/ and another feature's public.ts.
    {
      name: 'client-features-stay-apart',
      comment: 'A client feature imports only lib/, app/, shared/, its own folder and another feature\'s public.ts.',
      severity: 'error',
      from: { path: '^client/features/([^/]+)/' },
      to: { path: '^client/features/', pathNot: ['^client/features/$1/', '^client/features/[^/]+/public\\.tsx?$'] },
    },
    {
      name: 'client-no-server',
      comment: 'The capture app never imports server code.',
      severity: 'error',
      from: { path: '^client/' },
      to: { path: '^server/' },
    },
    {
      name: 'no-circular-client',
      comment: 'No import cycles in client/.',
      severity: 'error',
      from: { path: '^client/' },
      to: { circular: true },
    },
  ],
  options: {
    doNotFollow: { path: 'node_modules' },
    exclude: { path: '(^|/)(dist|node_modules)/' },
    tsPreCompilationDeps: true,
    tsConfig: { fileName: 'tsconfig.json' },
    enhancedResolveOptions: { exportsFields: ['exports'], conditionNames: ['import', 'require', 'node', 'default', 'types'] },
    reporterOptions: { text: { highlightFocused: true } },
  },
};
