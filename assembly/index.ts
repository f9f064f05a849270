// The kernels' flat surface: numeric functions only, buffers by address.
export { reserve } from "./buffers";
export { enumerate, MODE_SURVIVORS, MODE_FULL } from "./enumerate";
export { cycleSearch } from "./cycles";
export { census } from "./census";
