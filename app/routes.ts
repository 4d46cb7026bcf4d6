import { type RouteConfig, index, layout, prefix, route } from "@react-router/dev/routes";

// Every route here needs an entry in tests/integration/route-matrix.test.ts (statuses per role).
export default [
  // ---- public: sign-in, invitations, password reset, monitoring -------------------------------
  route("signin", "routes/auth/signin.tsx"),
  route("signout", "routes/auth/signout.tsx"),
  route("invite/:token", "routes/auth/invite.tsx"),
  route("reset", "routes/auth/reset-request.tsx"),
  route("reset/:token", "routes/auth/reset.tsx"),
  route("healthz", "routes/healthz.ts"),

  // ---- the signed-in shell ------------------------------------------------------------------
  layout("routes/shell.tsx", [
    index("routes/shop-floor.tsx"),
    route("account", "routes/account.tsx"),

    // procedures
    route("procedures", "routes/procedures/index.tsx"),
    route("procedures/new", "routes/procedures/new.tsx"),
    route("procedures/:slug", "routes/procedures/read.tsx"),
    route("procedures/:slug/history", "routes/procedures/history.tsx"),
    route("procedures/:slug/compare", "routes/procedures/compare.tsx"),
    route("procedures/:slug/print", "routes/procedures/print.tsx"),
    route("procedures/:slug/r/:number", "routes/procedures/revision.tsx"),
    route("procedures/:slug/r/:number/edit", "routes/procedures/edit.tsx"),

    // recordings
    route("recordings", "routes/recordings/index.tsx"),
    route("recordings/upload", "routes/recordings/upload.tsx"),
    route("recordings/:id", "routes/recordings/watch.tsx"),

    // builds (one engine job each, by work order number)
    route("builds", "routes/builds/index.tsx"),
    route("builds/new", "routes/builds/new.tsx"),
    route("builds/:number", "routes/builds/build.tsx"),
    route("builds/:number/edit", "routes/builds/edit.tsx"),
    route("builds/:number/sheet", "routes/builds/sheet.tsx"),
    route("builds/:number/sheet.pdf", "routes/builds/sheet-pdf.ts"),
    route("builds/:number/readings.csv", "routes/builds/readings-csv.ts"),

    // test records
    route("test-records", "routes/test-records/index.tsx"),
    route("test-records/new", "routes/test-records/new.tsx"),
    route("test-records/export.csv", "routes/test-records/export.ts"),
    route("test-records/:id", "routes/test-records/record.tsx"),
    route("test-records/:id/amend", "routes/test-records/amend.tsx"),
    route("test-records/:id/print", "routes/test-records/print.tsx"),

    // runs: a procedure worked step by step on a build
    route("runs/start", "routes/runs/start.tsx"),
    route("runs/:id", "routes/runs/run.tsx"),

    // calculators
    route("calculators", "routes/calculators/index.tsx"),
    route("calculators/preload", "routes/calculators/preload.tsx"),
    route("calculators/distortion", "routes/calculators/distortion.tsx"),
    route("calculators/clearance", "routes/calculators/clearance.tsx"),

    // search
    route("search", "routes/search.tsx"),
    route("search/words", "routes/search-words.tsx"),

    // administration
    ...prefix("admin", [
      index("routes/admin/index.tsx"),
      route("people", "routes/admin/people.tsx"),
      route("outbox", "routes/admin/outbox.tsx"),
      route("search", "routes/admin/search.tsx"),
    ]),
  ]),

  // ---- JSON API (resource routes) -----------------------------------------------------------
  ...prefix("api", [
    route("me", "routes/api/me.ts"),
    route("calc/preload", "routes/api/calc.preload.ts"),
    route("calc/distortion", "routes/api/calc.distortion.ts"),
    route("calc/clearance", "routes/api/calc.clearance.ts"),
    route("search", "routes/api/search.ts"),
    route("builds/:number", "routes/api/builds.ts"),
    route("procedures/titles", "routes/api/procedures/titles.ts"),
    route("procedures/recordings", "routes/api/procedures/recordings.ts"),
    route("procedures/revisions/:id", "routes/api/procedures/revision.ts"),
    route("uploads/*", "routes/api/uploads.ts"),
    route("recordings", "routes/api/recordings/index.ts"),
    route("recordings/:id", "routes/api/recordings/recording.ts"),
    route("recordings/:id/media", "routes/api/recordings/media.ts"),
    route("recordings/:id/poster", "routes/api/recordings/poster.ts"),
    route("recordings/:id/original", "routes/api/recordings/original.ts"),
    route("recordings/:id/marks", "routes/api/recordings/marks.ts"),
    route("recordings/:id/marks/:markId", "routes/api/recordings/mark.ts"),
    route("recordings/:id/readings", "routes/api/recordings/readings.ts"),
    route("recordings/:id/readings/:readingId", "routes/api/recordings/reading.ts"),
    route("runs/:id/entries", "routes/api/runs.entries.ts"),
    route("runs/:id/photos", "routes/api/runs.photos.ts"),
    route("runs/:id/photos/:photoId", "routes/api/runs.photo.ts"),
    route("recordings/:id/captions", "routes/api/recordings/captions.ts"),
    route("recordings/:id/captions/:cueId", "routes/api/recordings/captions.cue.ts"),
    route("recordings/:id/captions.vtt", "routes/api/recordings/captions.as-vtt.ts"),
    route("recordings/:id/captions.srt", "routes/api/recordings/captions.as-srt.ts"),
  ]),
] satisfies RouteConfig;
