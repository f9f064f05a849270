// Caller-provided buffers and the streaming protocol shared by every kernel.
// The host reserves regions with `reserve`, hands their addresses to a kernel, and is called back
// through `env.flush(channel, count)` whenever a fixed-size chunk is full (channels: layout.ts).

@external("env", "flush")
export declare function flush(channel: i32, count: i32): void;

/** Reserves `bytes` of linear memory for the host; the address is 8-byte aligned. */
export function reserve(bytes: usize): usize {
  return heap.alloc(bytes);
}
