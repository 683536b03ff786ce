// Imported first by server/cli/bench.ts: the in-process copy of the app logs warnings only, so
// request logs do not mix with the bench's tables (ESM runs imports in order).
process.env.LOG_LEVEL ??= "warn";
