// The layer rules as code (`npm run check:layers`; also part of `npm run lint` and `npm test`).
// DEVELOPERS.md ("Layers") explains why each rule holds. In short:
//   app         → components, db, lib        (routing, pages, route handlers, server actions)
//   components  → lib                        (UI; never db/, not even for types)
//   db          → lib                        (schema, data access, read models)
//   ingest      → db, lib                    (broker, worker, rules runner, mailer)
//   simulators  → lib                        (speak MQTT; the backfill may reuse the ingest writer)
//   lib         → lib only, and no I/O       (pure domain code shared by app and worker)
//   nothing outside app/ (bar the tests) imports app/; no circular imports anywhere.
// Every layer may import files inside its own folder. tests/ and scripts/ are not layers: they
// may reach into any layer to exercise or bootstrap it.

/** Node built-ins and packages that do I/O; lib/ must stay pure. */
const IO_MODULES = [
  "^(node:)?(fs|fs/promises|net|http|https|http2|tls|dgram|dns|child_process|cluster|worker_threads|readline)$",
  "^(mysql2|drizzle-orm|mqtt|aedes|nodemailer|smtp-server|mailparser|next|next-auth|server-only|sharp|file-type)(/|$)",
];

/** @type {import('dependency-cruiser').IConfiguration} */
module.exports = {
  forbidden: [
    {
      name: "no-circular",
      severity: "error",
      comment: "Circular imports make load order matter and hide side effects; break the cycle.",
      from: {},
      to: { circular: true },
    },
    {
      name: "nothing-imports-app",
      severity: "error",
      comment: "app/ is the outermost layer (routes and server actions); nothing else may depend on it.",
      from: { path: "^(components|db|lib|ingest|simulators)/" },
      to: { path: "^app/" },
    },
    {
      name: "components-only-lib",
      severity: "error",
      comment:
        "components/ runs in the browser: it may use lib/ (vocabulary, view types) but never db/ " +
        "(not even types) or server processes.",
      from: { path: "^components/" },
      to: { path: "^(db|ingest|simulators|scripts|tests)/" },
    },
    {
      name: "db-only-lib",
      severity: "error",
      comment: "db/ holds schema, data access and read models; it builds on lib/ and nothing above it.",
      from: { path: "^db/" },
      to: { path: "^(components|ingest|simulators|scripts|tests)/" },
    },
    {
      name: "ingest-only-db-lib",
      severity: "error",
      comment: "ingest/ is plain Node processes; UI words and types come from lib/, not components/.",
      from: { path: "^ingest/" },
      to: { path: "^(components|simulators|scripts|tests)/" },
    },
    {
      name: "simulators-only-lib",
      severity: "error",
      comment:
        "Simulators stand in for devices, so they speak MQTT and use lib/ contracts only. The " +
        "backfill alone may write through the ingest writer (and the db client it needs), with no SQL of its own.",
      from: { path: "^simulators/", pathNot: "^simulators/backfill(-alert-writer)?[.]ts$" },
      to: { path: "^(components|db|ingest|scripts|tests)/" },
    },
    {
      name: "backfill-only-ingest-writer",
      severity: "error",
      comment:
        "The backfill reuses the ingest writer, and for its alerts the live runner's rule and plant loaders and the " +
        "history writers of db/seed-*; it does not query tables itself.",
      from: { path: "^simulators/backfill(-alert-writer)?[.]ts$" },
      to: {
        path: "^(components|db|ingest|scripts|tests)/",
        pathNot:
          "^(ingest/writer[.]ts|db/queries/readings-write[.]ts|db/queries/rule-rows[.]ts|db/queries/topology[.]ts|db/seed-alert-history[.]ts|db/seed-equipment-history[.]ts|db/client[.]ts|db/env[.]ts)$",
      },
    },
    {
      name: "lib-only-lib",
      severity: "error",
      comment: "lib/ is pure domain code used by the app and the worker alike: it imports only lib/.",
      from: { path: "^lib/" },
      to: { path: "^(app|components|db|ingest|simulators|scripts|tests)/" },
    },
    {
      name: "lib-no-io",
      severity: "error",
      comment: "lib/ does no I/O (files, network, database, mail, framework); pass data in instead.",
      from: { path: "^lib/" },
      to: { path: IO_MODULES },
    },
    {
      name: "not-to-unresolvable",
      severity: "error",
      comment: "An import that does not resolve is a typo or a missing package.",
      from: {},
      to: { couldNotResolve: true },
    },
  ],
  options: {
    doNotFollow: { path: "node_modules" },
    exclude: { path: "^(node_modules|[.]next[^/]*|[.]data|db/migrations)/" },
    tsPreCompilationDeps: true,
    tsConfig: { fileName: "tsconfig.json" },
    enhancedResolveOptions: {
      exportsFields: ["exports"],
      conditionNames: ["import", "require", "node", "default", "types"],
      extensions: [".ts", ".tsx", ".js", ".mjs", ".cjs", ".json"],
      mainFields: ["module", "main", "types", "typings"],
    },
    reporterOptions: { text: { highlightFocused: true } },
  },
};
