// The kernels' flat surface: numeric functions only, buffers by address, and the shared memory
// layout as exported globals (read by the host's loader, src/engine/loader.ts).
export * from "./layout";
export { reserve } from "./buffers";
export { enumerate, MODE_SURVIVORS, MODE_FULL } from "./enumerate";
export { cycleSearch } from "./cycles";
export { census } from "./census";
export { inverseTree } from "./inverse";
export { verifyPrepare } from "./verify/prepare";
export { verifyAligned, verifyRange } from "./verify/periods";
export { verifyDelays } from "./verify/delays";
export { verifyClasses } from "./verify/classes";
export { verifyPreimage, verifySliceSkip } from "./verify/preimage";
export { probe128 } from "./u128";
export { probeRuns } from "./verify/walk";
export { probeDeeper } from "./verify/deeper";
