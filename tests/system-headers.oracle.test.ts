// Oracle: the layouts ferrule computes for the system structs it reads from each target's own
// headers (analysis/system.ts: Debian linux-libc-dev / libc6-dev and their *-cross packages, read
// through our preprocessor and C extractor) equal gcc's `sizeof` / `offsetof` / `_Alignof` for the
// same headers, compiled by gcc, aarch64-linux-gnu-gcc, arm-linux-gnueabihf-gcc and
// i686-linux-gnu-gcc (each compiler reads its own target's headers). A missing compiler is skipped
// and named.
import { beforeAll, describe, expect, test } from "vitest";
import { initParsers } from "../server/src/extract/index.js";
import { SYSTEM_STRUCTS, systemLayout } from "../server/src/analysis/system.js";
import { cValuesGcc, GCC_FOR, have, type Triple } from "./oracles/compilers.js";

const LINUX: Triple[] = ["x86_64-unknown-linux-gnu", "aarch64-unknown-linux-gnu", "armv7-unknown-linux-gnueabihf", "i686-unknown-linux-gnu"];
const NAMES = ["epoll_event", "vfio_iommu_type1_dma_map", "vfio_iommu_type1_dma_unmap", "vfio_region_info", "vfio_irq_set", "dma_heap_allocation_data", "spi_ioc_transfer"];

beforeAll(async () => {
  await initParsers();
  const missing = LINUX.filter((t) => !have(GCC_FOR[t]!)).map((t) => GCC_FOR[t]);
  if (missing.length) console.log(`system-headers oracle: skipped, compiler not installed: ${missing.join(", ")}`);
}, 60_000);

describe("system struct layouts equal gcc's for each target's headers", () => {
  for (const triple of LINUX) {
    const gcc = GCC_FOR[triple]!;
    test.skipIf(!have(gcc))(`${triple} (${gcc})`, () => {
      const headers = [...new Set(NAMES.map((n) => SYSTEM_STRUCTS[n]))];
      const prelude = `#include <stddef.h>\n${headers.map((h) => `#include <${h}>`).join("\n")}\n`;
      const exprs: string[] = [];
      const want: number[] = [];
      for (const n of NAMES) {
        const l = systemLayout(n, triple);
        expect(l, `${n} on ${triple}`).toBeDefined();
        exprs.push(`sizeof(struct ${n})`, `_Alignof(struct ${n})`);
        want.push(l!.layout.size, l!.layout.align);
        for (const f of l!.layout.fields ?? []) {
          if (f.bits !== undefined || f.name === "") continue;
          exprs.push(`offsetof(struct ${n}, ${f.name})`);
          want.push(f.offset);
        }
      }
      expect(exprs.length).toBeGreaterThan(NAMES.length * 3);
      expect(cValuesGcc(triple, prelude, exprs)).toEqual(want);
    }, 120_000);
  }
});

test("x86_64's epoll_event is packed to 12 bytes; aarch64 and armv7 keep 16 (glibc <sys/epoll.h>)", () => {
  expect(systemLayout("epoll_event", "x86_64-unknown-linux-gnu")?.layout.size).toBe(12);
  expect(systemLayout("epoll_event", "aarch64-unknown-linux-gnu")?.layout.size).toBe(16);
  expect(systemLayout("epoll_event", "armv7-unknown-linux-gnueabihf")?.layout.size).toBe(16);
});
