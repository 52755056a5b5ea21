// The project as its build sees it (plain data; analysis/project.ts discovers it from Cargo.toml,
// compile_commands.json and the tree): which link units each file is compiled into, the build
// settings its conditions are evaluated with, and what the workspace builds.

import type { Cond } from "./conditions.js";

export interface FileUnit {
  /** The link units (a library, a program) the file is compiled into. Two definitions of one
   * symbol clash only inside one unit. */
  units: string[];
  /** The Cargo package the file belongs to. */
  crate?: string;
  /** The package's enabled features (Cargo defaults, features its dependents in the tree ask
   * for, and the configured `features`); undefined when unknown (any may be on). */
  features?: string[];
  /** Features the package declares and does not enable: left open (whoever builds it may). */
  optional?: string[];
  /** The condition the module tree puts on the whole file (`#[cfg(…)] mod x;`); undefined: none. */
  cond?: Cond;
  /** How the file is built: a library, a program of its own, a build script, or not reached
   * from any target root of its package. */
  kind?: "lib" | "bin" | "example" | "test" | "bench" | "build" | "c" | "unreached";
  /** C/C++: listed in compile_commands.json (its link unit is the build's, not a guess). */
  compiled?: boolean;
  /** C/C++: `-D` defines from compile_commands.json and the configuration. */
  defines?: Record<string, string>;
}

export interface CrateInfo {
  name: string;
  /** The package folder. */
  dir: string;
  /** The package has a build script. */
  buildScript: boolean;
  /** A C/C++ header lies in the package's folder. */
  hasHeader: boolean;
  /** `[package] links = "…"` and the library names its targets build. */
  libs: string[];
}

export interface ProjectInfo {
  /** The project root (the folder the build files were read from). */
  root: string;
  /** Per file (absolute path). Files not listed: one default unit, conditions with unknown features. */
  files: Map<string, FileUnit>;
  crates: Map<string, CrateInfo>;
  /** The tree holds assembly sources (.S/.asm) or a build that assembles them. */
  hasAsm: boolean;
  /** Identifiers of the tree's assembly sources (a leading `_` dropped): names they may define. */
  asmNames?: Set<string>;
  /** Libraries the tree builds (package `links`, library target names, C build targets). */
  builtLibs: Set<string>;
  /** Configured defines (`defines = {…}` in .ferrule.toml), for every C/C++ file. */
  defines: Record<string, string>;
  /** Include folders of compile_commands.json (-I, -isystem, -iquote). */
  includeDirs: string[];
}

/** Folder names that hold one architecture's variant of a file (common practice in codec and
 * DSP trees: `src/x86/cpu.c`, `src/arm/cpu.c`), mapped to one spelling. */
export const ARCH_DIRS: Record<string, string> = {
  x86: "x86", x86_64: "x86", x64: "x86", amd64: "x86", i386: "x86", ia32: "x86",
  arm: "arm", arm32: "arm", arm64: "arm", aarch64: "arm", neon: "arm",
  ppc: "ppc", powerpc: "ppc", ppc64: "ppc",
  riscv: "riscv", riscv64: "riscv", rv64: "riscv",
  loongarch: "loongarch", loongarch64: "loongarch",
  mips: "mips", mips64: "mips",
  wasm: "wasm", wasm32: "wasm",
  sparc: "sparc", s390x: "s390x",
};

/** The architecture variant a file's path names (its nearest arch-named folder), if any. */
export function archVariant(file: string): string | undefined {
  const parts = file.split(/[\\/]/);
  for (let i = parts.length - 2; i >= 0; i--) {
    const a = ARCH_DIRS[parts[i]!.toLowerCase()];
    if (a) return a;
  }
  return undefined;
}
