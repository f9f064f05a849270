// The WASM boundary: every number the host keeps a copy of equals the one the kernel build exports
// (assembly/layout.ts), in both builds. A copy that drifts fails here, not only in a worker at run time.
import { describe, expect, it } from "vitest";
import { MAX_KERNEL_DEPTH } from "../src/core/map.js";
import { Kernel } from "../src/engine/loader.js";
import { TALLY_STRIDE } from "../src/engine/messages.js";
import { MAX_CYCLE_PERIOD } from "../src/jobs/cycles/cycles.js";
import { INVERSE_BOUND_BITS } from "../src/jobs/tree/messages.js";
import { VERIFY_CHANNEL_NAMES } from "../src/jobs/verify/kernel.js";
import { KERNEL_N_BITS, MAX_CLASS_DEPTH, MAX_LIMIT_BITS, MAX_VERIFY_SIEVE_DEPTH, MAX_VERIFY_STEP_DEPTH } from "../src/jobs/verify/plan.js";
import { loadKernelModule } from "../src/node/kernel.js";

for (const flavour of ["debug", "release"] as const) {
  describe(`layout (${flavour}): the host's copies of the kernel's numbers`, async () => {
    const kernel = await Kernel.instantiate(await loadKernelModule(flavour));
    const L = (name: string) => kernel.layout(name);

    it("depth limits: src/core/map.ts, the cycle search, the verification plan", () => {
      expect(MAX_KERNEL_DEPTH).toBe(L("MAX_DEPTH"));
      expect(MAX_CYCLE_PERIOD).toBe(L("MAX_DEPTH"));
      expect(L("TABLE_ENTRIES")).toBe(L("MAX_DEPTH") + 1);
      expect(MAX_VERIFY_SIEVE_DEPTH).toBe(L("VERIFY_MAX_DEPTH"));
      expect(MAX_VERIFY_STEP_DEPTH).toBe(L("VERIFY_MAX_STEP_DEPTH"));
      expect(MAX_CLASS_DEPTH).toBe(L("VERIFY_MAX_CLASS_DEPTH"));
      expect(L("VERIFY_MAX_CLASS_DEPTH")).toBeLessThan(L("MAX_DEPTH"));
    });

    it("widths: n below 2^127 and values of 128 bits in verification, inverse-tree nodes below 2^62", () => {
      expect(KERNEL_N_BITS).toBe(L("VERIFY_N_BITS"));
      expect(MAX_LIMIT_BITS).toBe(L("VERIFY_LIMIT_BITS"));
      expect(INVERSE_BOUND_BITS).toBe(L("INVERSE_BOUND_BITS"));
    });

    it("tables: the tally stride, entries of 4 words, the step tables' peaks", () => {
      expect(TALLY_STRIDE).toBe(L("TALLY_STRIDE"));
      expect(L("TALLY_STRIDE")).toBe(2 ** L("TALLY_SHIFT"));
      expect(L("ENTRY_WORDS") * 8).toBe(L("ENTRY_BYTES"));
      expect(L("CYCLE_DIVISOR_BYTES")).toBe(L("TALLY_STRIDE") ** 2 * L("CYCLE_DIVISOR_WORDS") * 8);
    });

    it("verification's channels: the host's list is the kernel's VERIFY_CHANNELS, in channel order", () => {
      expect(VERIFY_CHANNEL_NAMES.length).toBe(L("VERIFY_CHANNELS"));
      expect(VERIFY_CHANNEL_NAMES.map(L)).toEqual(VERIFY_CHANNEL_NAMES.map((_, i) => L("CHANNEL_GLIDE_RECORDS") + i));
      expect(L("VERIFY_SCRATCH_BYTES")).toBe(L("VERIFY_CHANNELS") * L("VERIFY_REGION_BYTES"));
    });
  });
}
