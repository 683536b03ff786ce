/**
 * Preloaded into the bench's server process only (`node --import tsx --import ./server/bench/probe.ts
 * server/index.ts`): the event-loop delay histogram of perf_hooks, read and reset over the IPC
 * channel the bench opens. Nothing in the product imports it.
 */
import { monitorEventLoopDelay } from "node:perf_hooks";

const h = monitorEventLoopDelay({ resolution: 10 });
h.enable();
process.on("message", (m: unknown) => {
  if (m === "eld-reset") {
    h.reset();
    process.send?.({ type: "eld-reset" });
  } else if (m === "eld-read") {
    const ms = (ns: number) => ns / 1e6;
    process.send?.({ type: "eld", p50: ms(h.percentile(50)), p99: ms(h.percentile(99)), max: ms(h.max) });
  }
});
// The IPC channel must not keep the server alive on its own once it is asked to stop.
process.channel?.unref();
