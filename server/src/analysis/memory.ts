// Bounded memory for the CLI's long runs. V8 collects its old generation lazily: checking a
// 1M-line workspace chunk by chunk keeps ~40 MiB live, yet the heap grew to ~200 MiB of garbage
// before V8 collected (measured with FERRULE_TIMINGS=1 on the generated bench workspace). A
// HeapBudget asks for a full collection when the heap has grown a set amount past what was live
// after the last one, which bounds the peak at a few collections' cost (a full collection of a
// heap this size takes tens of milliseconds).

import * as v8 from "node:v8";
import * as vm from "node:vm";

let collector: (() => void) | undefined | null = null;

/** A full garbage collection; false when this runtime does not allow one. */
export function collectGarbage(): boolean {
  if (collector === null) {
    collector = (globalThis as { gc?: () => void }).gc;
    if (!collector) {
      try {
        // the flag only exposes `gc` to contexts made after it is set, hence the new context
        v8.setFlagsFromString("--expose-gc");
        collector = vm.runInNewContext("gc") as () => void;
      } catch {
        collector = undefined;
      }
    }
  }
  collector?.();
  return !!collector;
}

export class HeapBudget {
  private base = 0;

  /** `slackMiB`: how far the heap may grow past the last live size before a collection. */
  constructor(private readonly slackMiB: number) {}

  /** Call between steps of work; collects when the heap has outgrown the budget. */
  step(): void {
    const used = v8.getHeapStatistics().used_heap_size;
    if (used <= this.base + this.slackMiB * 2 ** 20) return;
    if (!collectGarbage()) return;
    this.base = v8.getHeapStatistics().used_heap_size;
  }
}
