// The browser headline alone (every n below 2^40 in one tab, with its certificate): about five
// minutes by classes. `npm run bench` runs it too when GLIDEPATH_BENCH_HEADLINE=1.
import { headlineBench } from "./web.js";

console.log((await headlineBench()).join("  "));
