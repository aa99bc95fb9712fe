/**
 * Import rules the build enforces (`npm run lint:imports`, first step of `npm test`).
 * The layers and resources are described in DEVELOPERS.md ("Layers, one way").
 */
const NODE_AND_FRAMEWORKS = [
  '^(node:)?(fs|path|os|crypto|http|https|stream|child_process|worker_threads|url|util|zlib|buffer|events|net|tls|process)(/|$)',
  '^node_modules/(express|knex|better-sqlite3|pg|passport|multer|nodemailer|pino|react|react-dom|react-router|@tanstack|i18next|react-i18next|workbox-[^/]+|idb|idb-keyval|vite-plugin-pwa)/',
];

/** Every rule fails the build. */
const rule = (name, comment, from, to) => ({ name, comment, severity: 'error', from, to });
const noCycles = (dir) => rule(`no-circular-${dir}`, `No import cycles in ${dir}/ (type-only imports count too).`, { path: `^${dir}/` }, { circular: true });
const SHARED_HAS_NO_RUNTIME = 'shared/ imports no Node builtins, no express or knex, no React or browser libraries.';

module.exports = {
  forbidden: [
    rule('shared-is-pure', 'shared/ runs on the server and the phone: it imports nothing from server/ or client/.', { path: '^shared/' }, { path: '^(server|client)/' }),
    rule('shared-has-no-runtime', SHARED_HAS_NO_RUNTIME, { path: '^shared/' }, { dependencyTypes: ['core'] }),
    rule('shared-has-no-frameworks', SHARED_HAS_NO_RUNTIME, { path: '^shared/' }, { path: NODE_AND_FRAMEWORKS }),
    rule(
      'resources-meet-through-public',
      'A server resource uses another only through its public.ts (server/platform/ is for everyone); index.ts is what server/app.ts mounts.',
      { path: '^server/([^/]+)/' },
      { path: '^server/[^/]+/', pathNot: ['^server/$1/', '^server/platform/', '^server/[^/]+/public\\.ts$'] },
    ),
    rule(
      'registry-knows-no-walks',
      'The registry (ranches, fields, plantings) imports nothing of field walks: walks reads plantings through server/registry/public.ts, never the reverse.',
      { path: '^server/registry/' },
      { path: '^server/walks/' },
    ),
    rule(
      'app-uses-resource-entries',
      "server/app.ts and main.ts take routers from each resource's index.ts, and anything else from platform/ or public.ts.",
      { path: '^server/[^/]+\\.ts$' },
      { path: '^server/[^/]+/', pathNot: ['^server/platform/', '^server/[^/]+/(index|public)\\.ts$'] },
    ),
    rule(
      'routes-call-services',
      "Route and page files never import db modules: they call the resource's services.",
      { path: '^server/.*(routes|pages)\\.ts$' },
      { path: '^server/.*(/db|-db)\\.ts$' },
    ),
    noCycles('server'),
    // The capture app: features meet through lib/, app/ and another feature's public.ts.
    rule(
      'client-features-stay-apart',
      "A client feature imports only lib/, app/, shared/, its own folder and another feature's public.ts.",
      { path: '^client/features/([^/]+)/' },
      { path: '^client/features/', pathNot: ['^client/features/$1/', '^client/features/[^/]+/public\\.tsx?$'] },
    ),
    rule('client-no-server', 'The capture app never imports server code.', { path: '^client/' }, { path: '^server/' }),
    noCycles('client'),
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
