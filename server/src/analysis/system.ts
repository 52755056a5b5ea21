// System headers as a per-target reference (issue #20): the layouts of the kernel UAPI and C
// library structs that Rust `#[repr(C)]` mirrors copy. This is the one place ferrule reads outside
// the project, and only fixed system locations (Debian's linux-libc-dev / libc6-dev and their
// `*-cross` packages), never a path a repository names. Headers are read lazily, through our
// preprocessor with that target's predefined macros and our C extractor, and cached per target.
// Rules stay pure: the model receives the layouts as facts (`ModelConfig.system`).

import { readFileSync, statSync } from "node:fs";
import { dirname, join } from "node:path";
import { extractFile } from "../extract/index.js";
import { Model, type SystemFacts, type SystemLayout } from "../model/boundary.js";
export type { SystemFacts, SystemLayout };
import { declLayout } from "../model/layout.js";
import type { FileFacts } from "../model/types.js";
import type { Triple } from "../model/targets.js";

/** System struct name → the header that declares it (the header a C program includes). */
export const SYSTEM_STRUCTS: Readonly<Record<string, string>> = {
  epoll_event: "sys/epoll.h",
  vfio_iommu_type1_dma_map: "linux/vfio.h",
  vfio_iommu_type1_dma_unmap: "linux/vfio.h",
  vfio_iommu_type1_info: "linux/vfio.h",
  vfio_region_info: "linux/vfio.h",
  vfio_device_info: "linux/vfio.h",
  vfio_irq_set: "linux/vfio.h",
  vfio_group_status: "linux/vfio.h",
  dma_heap_allocation_data: "linux/dma-heap.h",
  spi_ioc_transfer: "linux/spi/spidev.h",
  i2c_msg: "linux/i2c.h",
  i2c_rdwr_ioctl_data: "linux/i2c-dev.h",
};

/** Include directories per target, in search order (Debian multiarch and cross layouts). */
export const SYSTEM_DIRS: Readonly<Partial<Record<Triple, string[]>>> = {
  "x86_64-unknown-linux-gnu": ["/usr/include/x86_64-linux-gnu", "/usr/include"],
  "aarch64-unknown-linux-gnu": ["/usr/aarch64-linux-gnu/include"],
  "armv7-unknown-linux-gnueabihf": ["/usr/arm-linux-gnueabihf/include"],
  "i686-unknown-linux-gnu": ["/usr/i686-linux-gnu/include"],
};

const MAX_HEADER = 2_000_000;

function readSys(path: string): string | undefined {
  try {
    if (!statSync(path).isFile()) return undefined;
    const t = readFileSync(path, "utf8");
    return t.length > MAX_HEADER ? undefined : t;
  } catch {
    return undefined;
  }
}

function findIn(dirs: readonly string[], from: string | undefined, path: string, system: boolean): string | undefined {
  if (path.includes("..") || path.startsWith("/")) return undefined;
  const cands = [...(!system && from ? [join(dirname(from), path)] : []), ...dirs.map((d) => join(d, path))];
  for (const c of cands) if (readSys(c) !== undefined) return c;
  return undefined;
}

/** Per target: header → linked model of it and everything it includes. */
const cache = new Map<string, { model: Model; file: string } | null>();

function headerModel(triple: Triple, header: string): { model: Model; file: string } | undefined {
  const key = `${triple}|${header}`;
  const hit = cache.get(key);
  if (hit !== undefined) return hit ?? undefined;
  const dirs = SYSTEM_DIRS[triple];
  let out: { model: Model; file: string } | null = null;
  const main = dirs && findIn(dirs, undefined, header, true);
  if (dirs && main) {
    const text = readSys(main)!;
    const readInclude = (from: string, p: string, system: boolean) => {
      const f = findIn(dirs, from, p, system);
      const t = f && readSys(f);
      return f && t !== undefined ? { file: f, text: t } : undefined;
    };
    const env = { targets: [triple], readInclude };
    const facts: FileFacts[] = [extractFile(main, text, { preproc: env })];
    const reads = (facts[0].extra.preproc as { reads?: string[] } | undefined)?.reads ?? [];
    for (const f of reads) {
      const t = readSys(f);
      if (t !== undefined) facts.push(extractFile(f, t, { preproc: env }));
    }
    out = { model: new Model(facts, { targets: [triple], includePaths: [], families: {} }), file: main };
  }
  cache.set(key, out);
  return out ?? undefined;
}

/** The layout of system struct `name` on `triple`, or undefined (not a known system struct, headers
 * not installed, or the layout not computable). */
export function systemLayout(name: string, triple: Triple): SystemLayout | undefined {
  const header = SYSTEM_STRUCTS[name];
  if (!header) return undefined;
  const hm = headerModel(triple, header);
  if (!hm) return undefined;
  const decl = hm.model.typeDecls(name, "c").find((d) => d.fields.length > 0);
  if (!decl) return undefined;
  const layout = declLayout(decl, { model: hm.model, side: "c", triple });
  if (layout.unknown || layout.notPortable) return undefined;
  return { header, file: decl.file, layout };
}

/** The system facts a set of files needs: layouts of the system structs their Rust `#[repr(C)]`
 * types are named after (or cast to), on each target. */
export function systemFactsFor(facts: Iterable<FileFacts>, targets: readonly Triple[]): SystemFacts {
  const out: SystemFacts = new Map();
  for (const f of facts) {
    if (f.lang !== "rust") continue;
    const names = new Set<string>();
    for (const t of f.types) if (SYSTEM_STRUCTS[t.name]) names.add(t.name);
    const casts = (f.extra.sysmirror as { casts?: { to: string }[] } | undefined)?.casts ?? [];
    for (const c of casts) if (SYSTEM_STRUCTS[c.to]) names.add(c.to);
    for (const n of names) {
      if (out.has(n)) continue;
      const per: Partial<Record<Triple, SystemLayout>> = {};
      for (const tr of targets) {
        const l = systemLayout(n, tr);
        if (l) per[tr] = l;
      }
      out.set(n, per);
    }
  }
  return out;
}
