// The published tables the tests check against live in src/published.ts (with their sources),
// shared with the web app's "published" column.
export { A076227, A100982, A100982_DEPTHS } from "../src/core/published.js";
