// System mirrors (issue #20): Rust #[repr(C)] copies of kernel / C library structs compared per
// target with the layouts of each target's own headers (Debian linux-libc-dev / libc6-dev and the
// *-cross packages; those layouts are checked against gcc in tests/system-headers.oracle.test.ts).
import { beforeAll, describe, expect, it } from "vitest";
import { checkDir } from "../helpers/analyze";
import { initParsers } from "../../server/src/extract/index";

const DIR = "system-mirrors/system-mirror-differs";
const LINUX = ["x86_64-unknown-linux-gnu", "aarch64-unknown-linux-gnu", "armv7-unknown-linux-gnueabihf", "i686-unknown-linux-gnu"] as const;

beforeAll(async () => { await initParsers(); }, 60_000);

describe("system-mirror-differs", () => {
  it("finds a u64 where the kernel has __u32 (per-target offsets) and the unpacked epoll_event on x86_64 only", async () => {
    const { findings } = await checkDir(`${DIR}/bad`, { targets: [...LINUX] });
    const got = findings.filter((f) => f.rule === "system-mirror-differs");
    const dma = got.filter((f) => f.message.includes("vfio_iommu_type1_dma_map"));
    // per-target wording: a u64 after a u32 is at offset 8 where u64 is 8-aligned, at offset 4 on
    // i686 (System V i386 psABI: 4-aligned); the header's __u32 flags is at 4 on all four
    expect(dma.map((f) => f.range.line + 1)).toEqual([9, 9]);
    const wide = dma.find((f) => f.message.includes("`flags` is 8 bytes at offset 8"))!;
    const i686 = dma.find((f) => f.message.includes("`flags` is 8 bytes at offset 4"))!;
    expect(wide.message).toContain("<linux/vfio.h>");
    expect(wide.message).toContain("the header's `flags` is 4 bytes at offset 4");
    expect(wide.targets).toEqual(["x86_64-unknown-linux-gnu", "aarch64-unknown-linux-gnu", "armv7-unknown-linux-gnueabihf"]);
    expect(i686.targets).toEqual(["i686-unknown-linux-gnu"]);
    const ep = got.filter((f) => f.message.includes("epoll_event"));
    expect(ep.map((f) => f.range.line + 1)).toEqual([19]);
    // glibc's x86 <bits/epoll.h> packs struct epoll_event: 12 bytes on x86_64 and i686, 16 on
    // aarch64/armv7 (checked against gcc in the oracle test); on i686 a u64 is 4-aligned (System V
    // i386 psABI), so the unpacked mirror has the header's offsets and 12 bytes there too
    expect(ep[0]!.targets).toEqual(["x86_64-unknown-linux-gnu"]);
    expect(ep[0]!.message).toContain("on x86_64");
    expect(ep[0]!.message).toContain("size 16 vs 12 bytes");
    // a field widened in the middle of an extensible struct is still found (on every target)
    const reg = got.filter((f) => f.message.includes("vfio_region_info"));
    expect(reg.map((f) => f.range.line + 1)).toEqual([34]);
    expect(reg[0]!.message).toContain("field 3 `index` is 8 bytes at offset 8, the header's `index` is 4 bytes at offset 8");
    expect(reg[0]!.targets).toBeUndefined();
    expect(got).toHaveLength(4);
  }, 120_000);

  it("the correct twin (u32 flags, epoll_event packed under cfg(target_arch = \"x86_64\"), a newer kernel's vfio_device_info) is clean", async () => {
    const { findings } = await checkDir(`${DIR}/good`, { targets: [...LINUX] });
    // also: a vfio_device_info mirror from a newer kernel (trailing fields the installed header
    // lacks) is not a slip — extensible UAPI structs grow at their end (argsz, common practice)
    expect(findings.filter((f) => f.rule === "system-mirror-differs")).toEqual([]);
  }, 120_000);
});
