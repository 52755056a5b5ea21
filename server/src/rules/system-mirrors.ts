// Rule family "system-mirrors": Rust `#[repr(C)]` copies of kernel UAPI and C library structs
// (`epoll_event`, `vfio_iommu_type1_dma_map`, `spi_ioc_transfer`, …) compared, per target, with
// the layout the target's own headers give (issue #20). The analysis layer reads the headers and
// hands the layouts to the model as facts (`ModelConfig.system`); this rule only compares.

import type { Model, SystemLayout } from "../model/boundary.js";
import { canHold } from "../model/conditions.js";
import { declLayout, type Layout } from "../model/layout.js";
import { shortTriple, type Triple } from "../model/targets.js";
import type { TypeDecl } from "../model/types.js";
import { finding, type Finding, type RuleFamily, type RuleMeta } from "./api.js";

export const SYSTEM_MIRROR_DIFFERS: RuleMeta = {
  id: "system-mirror-differs",
  severity: "error",
  summary: "A Rust #[repr(C)] copy of a kernel or C library struct has another size or field offsets than the target's own header",
  why:
    "The kernel and the C library read and write the struct at the offsets of their headers: a mirror with a wider field or " +
    "without the header's packing makes ioctl, epoll_wait or read fill the wrong bytes, silently, on the targets where it differs.",
};

/** The Rust types a check of system facts concerns: `#[repr(C)]` structs named after a system struct. */
function mirrors(model: Model): { d: TypeDecl; sys: Partial<Record<Triple, SystemLayout>> }[] {
  const sysFacts = model.config.system;
  if (!sysFacts || sysFacts.size === 0) return [];
  const out: { d: TypeDecl; sys: Partial<Record<Triple, SystemLayout>> }[] = [];
  for (const f of model.files.values()) {
    if (f.lang !== "rust") continue;
    for (const d of f.types) {
      if (!d.repr.c || d.repr.transparent || d.generic || d.fields.length === 0 || d.enumerators.length) continue;
      const sys = sysFacts.get(d.name);
      if (sys) out.push({ d, sys });
    }
  }
  return out;
}

/** The first difference between the mirror's layout and the header's, in words, or undefined. */
function difference(rust: Layout, sys: Layout, name: string): string | undefined {
  const rf = rust.fields ?? [];
  const sf = sys.fields ?? [];
  for (let i = 0; i < Math.min(rf.length, sf.length); i++) {
    const r = rf[i]!;
    const s = sf[i]!;
    if (r.offset !== s.offset || r.size !== s.size) {
      return `field ${i + 1} \`${r.name}\` is ${r.size} bytes at offset ${r.offset}, the header's \`${s.name}\` is ${s.size} bytes at offset ${s.offset}`;
    }
  }
  // Same fields as far as both go, one side longer: kernel UAPI structs grow at their end between
  // kernel versions (the `argsz` convention of VFIO and others: the caller says how many bytes it
  // knows, common practice), so a mirror from a newer or older kernel than the installed headers
  // is not a slip ferrule can tell.
  if (rf.length !== sf.length) return undefined;
  if (rust.size !== sys.size) return `it is ${rust.size} bytes, the header's \`struct ${name}\` is ${sys.size}`;
  // An alignment difference alone is left out: with equal offsets and size the kernel reads and
  // writes the same bytes (x86's packed epoll_event is 1-aligned, an unpacked i686 mirror with the
  // same 12 bytes is 4-aligned: harmless where user space owns the memory).
  return undefined;
}

export const systemMirrorsFamily: RuleFamily = {
  name: "system-mirrors",
  rules: [SYSTEM_MIRROR_DIFFERS],
  check(model: Model): Finding[] {
    const out: Finding[] = [];
    for (const { d, sys } of mirrors(model)) {
      // targets grouped by the same wording
      const byText = new Map<string, { targets: Triple[]; s: SystemLayout; rust: Layout }>();
      for (const triple of model.config.targets) {
        const s = sys[triple];
        if (!s) continue;
        // a mirror under `#[cfg(target_arch = …)]` is compared only on the targets it is built for
        const env = model.envsOf(d.file).find((e) => e.triple === triple);
        if (env && !canHold([model.condOf(d)], [env])) continue;
        const rust = declLayout(d, { model, side: "rust", triple });
        if (rust.unknown || rust.notPortable) continue;
        const diff = difference(rust, s.layout, d.name);
        if (!diff) continue;
        const g = byText.get(diff);
        if (g) g.targets.push(triple);
        else byText.set(diff, { targets: [triple], s, rust });
      }
      const checked = model.config.targets.filter((t) => {
        const env = model.envsOf(d.file).find((e) => e.triple === t);
        return sys[t] && !(env && !canHold([model.condOf(d)], [env]));
      });
      for (const [diff, g] of byText) {
        const where = g.targets.length === checked.length ? `on every target checked (${checked.map(shortTriple).join(", ")})` : `on ${g.targets.map(shortTriple).join(", ")}`;
        const msg = `\`${d.name}\` copies \`struct ${d.name}\` of <${g.s.header}>, but ${diff} ${where} (size ${g.rust.size} vs ${g.s.layout.size} bytes)`;
        out.push(finding(SYSTEM_MIRROR_DIFFERS, d.nameRange, msg, [], {
          targets: g.targets.length === model.config.targets.length ? undefined : g.targets,
          data: { header: g.s.header, system: d.name },
        }));
      }
    }
    return out;
  },
};
