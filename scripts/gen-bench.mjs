#!/usr/bin/env node
// Writes a synthetic but realistic mixed workspace for benchmarks: Rust kernel crates with
// `extern "C"` exports and #[repr(C)] types, hand-written C headers, and C++ block classes that
// call them, spread over four scenarios of our own (passive-sonar receiver, lightning-detector
// front end, seismic array, radio-telescope correlator).
//
// A seeded set of mismatches is planted (about one unit in three), each a finding of an existing
// ferrule rule; the exact expected set (rule, file, 1-based line) is written to planted.json at
// the workspace root so the benchmark can check that every planted finding is reported and
// nothing else is. The generated code also compiles: rustc --emit=metadata accepts every crate and
// g++ -fsyntax-only accepts every block (the mismatches are all across the seam, which neither
// compiler sees), so the compile-time comparison in scripts/bench.mjs measures real work.
//
// usage: node scripts/gen-bench.mjs --lines N [--out DIR] [--seed S]

import * as fs from "node:fs";
import * as path from "node:path";
import { fileURLToPath } from "node:url";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");

export const SCENARIOS = [
  { id: "sonar", title: "Passive-sonar receiver", unit: "hydrophone samples" },
  { id: "flash", title: "Lightning-detector front end", unit: "VLF antenna samples" },
  { id: "quake", title: "Seismic array", unit: "geophone samples" },
  { id: "corr", title: "Radio-telescope correlator", unit: "baseband samples" },
];
const KINDS = [
  ["fir", "FIR band-pass filter"],
  ["fft", "FFT magnitude"],
  ["beam", "delay-and-sum beamformer"],
  ["agc", "automatic gain control"],
  ["decim", "decimating low-pass"],
  ["xcorr", "cross-correlation"],
  ["pick", "onset picker"],
  ["notch", "mains notch filter"],
];

/** Every kind of mismatch the generator can plant (each a finding of an existing rule). */
export const PLANT_KINDS = [
  "param-type-mismatch",
  "pointer-constness",
  "export-name-mangled",
  "declaration-without-definition",
  "export-without-declaration",
  "callback-mismatch",
  "header-lacks-c-linkage",
  "not-c-representable",
  "return-type-mismatch",
  "param-signedness",
  "arity-mismatch",
];

/** mulberry32: small seeded PRNG (public-domain algorithm), so a seed always gives the same tree. */
function rng(seed) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const camel = (s) => s.split("_").map((w) => w[0].toUpperCase() + w.slice(1)).join("");

/** Lines of one file plus the planted findings recorded against them. */
class Out {
  constructor(rel) {
    this.rel = rel;
    this.lines = [];
  }
  add(...ls) {
    for (const l of ls) this.lines.push(l);
    return this.lines.length; // 1-based number of the last line added
  }
  /** Adds one line and returns its 1-based number. */
  at(l) {
    this.lines.push(l);
    return this.lines.length;
  }
  text() {
    return this.lines.join("\n") + "\n";
  }
}

function rustHelper(r, name) {
  const a = (r() * 0.9 + 0.05).toFixed(3);
  const b = 1 + Math.floor(r() * 7);
  return [
    `/// Helper: ${["Hann window", "Hamming window", "soft limiter", "leaky integrator", "DC blocker"][b % 5]} term.`,
    `fn ${name}(x: &[f32], k: usize) -> f32 {`,
    `    let n = x.len().max(1);`,
    `    let mut acc = 0.0f32;`,
    `    for (i, v) in x.iter().enumerate().skip(k % n) {`,
    `        let w = ${a} - (1.0 - ${a}) * ((i * ${b}) as f32 / n as f32).cos();`,
    `        acc += v * w;`,
    `        if acc.abs() > 1.0e6 {`,
    `            acc = acc.signum() * 1.0e6;`,
    `        }`,
    `    }`,
    `    acc / n as f32`,
    `}`,
    ``,
  ];
}

function cppHelper(r, name) {
  const c = (r() * 0.5 + 0.1).toFixed(3);
  return [
    `    // Smooths the level estimate between work() calls.`,
    `    float ${name}(const float *x, int n) {`,
    `        float acc = 0.0f;`,
    `        for (int i = 0; i < n; ++i) {`,
    `            float v = x[i] < 0.0f ? -x[i] : x[i];`,
    `            acc = ${c}f * v + (1.0f - ${c}f) * acc;`,
    `        }`,
    `        level_ = acc;`,
    `        return acc;`,
    `    }`,
    ``,
  ];
}

/**
 * One unit: a Rust kernel module, its C header and its C++ block. `plant` is a PLANT_KINDS entry
 * or undefined. Returns the files and the expected findings.
 */
function genUnit(r, scen, kind, idx, crate, plant) {
  const [kid, kdesc] = kind;
  const P = `${scen.id}_${kid}${idx}`; // C symbol prefix
  const T = camel(P); // type prefix
  const mod = `${kid}${idx}`;
  const rs = new Out(`crates/${crate}/src/${mod}.rs`);
  const h = new Out(`include/${scen.id}/${mod}.h`);
  const cc = new Out(`blocks/${scen.id}/${mod}_block.cc`);
  const expect = [];
  const exp = (rule, file, line) => expect.push({ rule, file: file.rel, line });
  const nm = r() < 0.5 ? "#[no_mangle]" : "#[unsafe(no_mangle)]";

  // ---------------- Rust ----------------
  rs.add(
    `//! ${scen.title}: ${kdesc} kernel ${idx}, called from blocks/${scen.id}/${mod}_block.cc`,
    `//! through include/${scen.id}/${mod}.h (hand-written; keep the two in step).`,
    ``,
    `use core::ffi::{c_int, c_void};`,
    `use core::slice;`,
    ``,
    `/// Tuning parameters shared with C (mirrored field by field in the header).`,
    `#[repr(C)]`,
    `#[derive(Clone, Copy, Debug)]`,
    `pub struct ${T}Config {`,
    `    pub gain: f32,`,
    `    pub ntaps: u32,`,
    `    pub center_hz: f64,`,
    `    pub decim: u32,`,
    `    pub flags: u32,`,
    `}`,
    ``,
    `/// Running statistics copied out to the block.`,
    `#[repr(C)]`,
    `#[derive(Clone, Copy, Debug, Default)]`,
    `pub struct ${T}Stats {`,
    `    pub processed: u64,`,
    `    pub peak: f32,`,
    `    pub mean: f32,`,
    `}`,
    ``,
    `/// Retuning request passed by value.`,
  );
  if (plant !== "not-c-representable") rs.add(`#[repr(C)]`);
  rs.add(`#[derive(Clone, Copy, Debug)]`);
  const tuningLine = rs.at(`pub struct ${T}Tuning {`);
  // the layout rules also see the C twin of a Rust struct without #[repr(C)]
  if (plant === "not-c-representable") exp("mirror-not-repr-c", rs, tuningLine);
  rs.add(
    `    pub center_hz: f64,`,
    `    pub bandwidth_hz: f64,`,
    `}`,
    ``,
    `/// Event callback: called with the sample index and the level that crossed the threshold.`,
    `pub type ${T}EventCb = unsafe extern "C" fn(ctx: *mut c_void, index: u64, level: f32);`,
    ``,
    `/// Kernel state kept behind an opaque handle.`,
    `pub struct ${T}State {`,
    `    cfg: ${T}Config,`,
    `    history: Vec<f32>,`,
    `    stats: ${T}Stats,`,
    `    decim: u32,`,
    `    cb: Option<${T}EventCb>,`,
    `    ctx: *mut c_void,`,
    `}`,
    ``,
  );
  const nHelpers = 3 + Math.floor(r() * 4);
  for (let i = 0; i < nHelpers; i++) rs.add(...rustHelper(r, `${kid}_term_${i}`));
  rs.add(
    `/// Creates the kernel state; returns null when \`cfg\` is null.`,
    nm,
    `pub unsafe extern "C" fn ${P}_new(cfg: *const ${T}Config) -> *mut ${T}State {`,
    `    if cfg.is_null() {`,
    `        return core::ptr::null_mut();`,
    `    }`,
    `    let cfg = unsafe { *cfg };`,
    `    let n = cfg.ntaps.max(1) as usize;`,
    `    let st = ${T}State { cfg, history: vec![0.0; n], stats: ${T}Stats::default(), decim: cfg.decim, cb: None, ctx: core::ptr::null_mut() };`,
    `    Box::into_raw(Box::new(st))`,
    `}`,
    ``,
    `/// Processes \`n\` ${scen.unit} from \`input\` into \`output\`.`,
    nm,
    `pub unsafe extern "C" fn ${P}_process(h: *mut ${T}State, input: *const f32, output: *mut f32, n: usize) -> c_int {`,
    `    if h.is_null() || input.is_null() || output.is_null() {`,
    `        return -1;`,
    `    }`,
    `    let st = unsafe { &mut *h };`,
    `    let x = unsafe { slice::from_raw_parts(input, n) };`,
    `    let y = unsafe { slice::from_raw_parts_mut(output, n) };`,
    `    // No indexing and wrapping counters: a panic must not unwind into the C++ caller.`,
    `    for (i, (out, v)) in y.iter_mut().zip(x).enumerate() {`,
    `        st.history.rotate_right(1);`,
    `        if let Some(first) = st.history.first_mut() {`,
    `            *first = v * st.cfg.gain;`,
    `        }`,
    `        *out = ${kid}_term_0(&st.history, i);`,
    `        let level = out.abs();`,
    `        if level > st.stats.peak {`,
    `            st.stats.peak = level;`,
    `            if let Some(cb) = st.cb {`,
    `                unsafe { cb(st.ctx, st.stats.processed.wrapping_add(i as u64), level) };`,
    `            }`,
    `        }`,
    `    }`,
    `    st.stats.processed = st.stats.processed.wrapping_add(n as u64);`,
    `    0`,
    `}`,
    ``,
    `/// Normalises \`n\` samples in place (writes through \`buf\`).`,
    nm,
    `pub unsafe extern "C" fn ${P}_normalize(buf: *mut f32, n: usize) {`,
    `    let b = unsafe { slice::from_raw_parts_mut(buf, n) };`,
    `    let peak = b.iter().fold(0.0f32, |m, v| m.max(v.abs())).max(1.0e-12);`,
    `    b.iter_mut().for_each(|v| *v /= peak);`,
    `}`,
    ``,
    `/// Sets the gain in dB; returns -1 when out of range.`,
  );
  let line;
  if (plant === "export-name-mangled") {
    line = rs.at(`pub unsafe extern "C" fn ${P}_set_gain(h: *mut ${T}State, gain_db: f32) -> c_int {`);
    exp("export-name-mangled", rs, line);
  } else {
    rs.add(nm);
    const ty = plant === "param-type-mismatch" ? "f64" : "f32";
    rs.add(`pub unsafe extern "C" fn ${P}_set_gain(h: *mut ${T}State, gain_db: ${ty}) -> c_int {`);
  }
  rs.add(
    `    if h.is_null() || gain_db > 60.0 {`,
    `        return -1;`,
    `    }`,
    `    unsafe { (*h).cfg.gain = 10.0f32.powf(gain_db as f32 / 20.0) };`,
    `    0`,
    `}`,
    ``,
    `/// Sets the decimation factor.`,
    nm,
    `pub unsafe extern "C" fn ${P}_set_decim(h: *mut ${T}State, factor: u32) -> c_int {`,
    `    match unsafe { h.as_mut() } {`,
    `        Some(st) if factor > 0 => {`,
    `            st.decim = factor;`,
    `            0`,
    `        }`,
    `        _ => -1,`,
    `    }`,
    `}`,
    ``,
    `/// Retunes the kernel.`,
    nm,
  );
  line = rs.at(`pub unsafe extern "C" fn ${P}_retune(h: *mut ${T}State, t: ${T}Tuning) -> c_int {`);
  if (plant === "not-c-representable") exp("not-c-representable", rs, line);
  rs.add(
    `    if let Some(st) = unsafe { h.as_mut() } {`,
    `        st.cfg.center_hz = t.center_hz;`,
    `        st.cfg.ntaps = (t.bandwidth_hz.max(1.0) as u32).min(1024);`,
    `        return 0;`,
    `    }`,
    `    -1`,
    `}`,
    ``,
    `/// Copies the running statistics into \`out\`.`,
    nm,
    `pub unsafe extern "C" fn ${P}_stats(h: *const ${T}State, out: *mut ${T}Stats) -> c_int {`,
    `    match (unsafe { h.as_ref() }, unsafe { out.as_mut() }) {`,
    `        (Some(st), Some(o)) => {`,
    `            *o = st.stats;`,
    `            0`,
    `        }`,
    `        _ => -1,`,
    `    }`,
    `}`,
    ``,
    `/// Registers the event callback; C may pass NULL to disable events.`,
    nm,
  );
  // Option<fn> is nullable with a C layout (null-pointer optimisation, Rust Reference: type layout).
  const cbTy = plant === "callback-mismatch" ? `${T}EventCb` : `Option<unsafe extern "C" fn(ctx: *mut c_void, index: u64, level: f32)>`;
  rs.add(
    `pub unsafe extern "C" fn ${P}_on_event(h: *mut ${T}State, cb: ${cbTy}, ctx: *mut c_void) -> c_int {`,
    `    let Some(st) = (unsafe { h.as_mut() }) else { return -1 };`,
    plant === "callback-mismatch" ? `    st.cb = Some(cb);` : `    st.cb = cb;`,
    `    st.ctx = ctx;`,
    `    0`,
    `}`,
    ``,
    `/// Number of samples held in the history.`,
    nm,
  );
  if (plant === "return-type-mismatch") {
    rs.add(`pub unsafe extern "C" fn ${P}_history_len(h: *const ${T}State) -> u32 {`, `    unsafe { h.as_ref() }.map_or(0, |st| st.history.len() as u32)`, `}`, ``);
  } else {
    rs.add(`pub unsafe extern "C" fn ${P}_history_len(h: *const ${T}State) -> usize {`, `    unsafe { h.as_ref() }.map_or(0, |st| st.history.len())`, `}`, ``);
  }
  rs.add(
    `/// Clears the history and the statistics.`,
    nm,
    `pub unsafe extern "C" fn ${P}_reset(h: *mut ${T}State) {`,
    `    if let Some(st) = unsafe { h.as_mut() } {`,
    `        st.history.iter_mut().for_each(|v| *v = 0.0);`,
    `        st.stats = ${T}Stats::default();`,
    `    }`,
    `}`,
    ``,
  );
  if (plant === "export-without-declaration") {
    rs.add(`/// Drops pending events (not yet in the header).`, nm);
    line = rs.at(`pub unsafe extern "C" fn ${P}_drain(h: *mut ${T}State) -> c_int {`);
    exp("export-without-declaration", rs, line);
    rs.add(`    if h.is_null() { -1 } else { 0 }`, `}`, ``);
  }
  rs.add(
    `/// Releases the state.`,
    nm,
    `pub unsafe extern "C" fn ${P}_free(h: *mut ${T}State) {`,
    `    if !h.is_null() {`,
    `        drop(unsafe { Box::from_raw(h) });`,
    `    }`,
    `}`,
  );

  // ---------------- C header ----------------
  const G = `${P.toUpperCase()}_H`;
  const guarded = plant !== "header-lacks-c-linkage";
  h.add(
    `/* ${scen.title}: C interface of the Rust ${kdesc} kernel ${idx} (hand-written). */`,
    `#ifndef ${G}`,
    `#define ${G}`,
    ``,
    `#include <stddef.h>`,
    `#include <stdint.h>`,
    ``,
  );
  if (guarded) h.add(`#ifdef __cplusplus`, `extern "C" {`, `#endif`, ``);
  h.add(
    `typedef struct ${T}Config {`,
    `    float gain;`,
    `    uint32_t ntaps;`,
    `    double center_hz;`,
    `    uint32_t decim;`,
    `    uint32_t flags;`,
    `} ${T}Config;`,
    ``,
    `typedef struct ${T}Stats {`,
    `    uint64_t processed;`,
    `    float peak;`,
    `    float mean;`,
    `} ${T}Stats;`,
    ``,
    `typedef struct ${T}Tuning {`,
    `    double center_hz;`,
    `    double bandwidth_hz;`,
    `} ${T}Tuning;`,
    ``,
    `/* Opaque kernel state owned by Rust. */`,
    `typedef struct ${T}State ${T}State;`,
    ``,
    `/* Event callback; may be NULL to disable events. */`,
    `typedef void (*${T}EventCb)(void *ctx, uint64_t index, float level);`,
    ``,
  );
  const proto = (text, rule) => {
    const l = h.at(text);
    if (!guarded) exp("header-lacks-c-linkage", h, l);
    if (rule) exp(rule, h, l);
    return l;
  };
  proto(`${T}State *${P}_new(const ${T}Config *cfg);`);
  proto(`int ${P}_process(${T}State *h, const float *input, float *output, size_t n);`);
  h.add(`/* buf: n samples, normalised in place. */`);
  if (plant === "pointer-constness") proto(`void ${P}_normalize(const float *buf, size_t n);`, "pointer-constness");
  else proto(`void ${P}_normalize(float *buf, size_t n);`);
  // a C declaration of a Rust fn without #[no_mangle]: linkage does not apply (Rust does not provide it)
  if (plant === "export-name-mangled") h.at(`int ${P}_set_gain(${T}State *h, float gain_db);`);
  else proto(`int ${P}_set_gain(${T}State *h, float gain_db);`, plant === "param-type-mismatch" ? "param-type-mismatch" : undefined);
  if (plant === "param-signedness") proto(`int ${P}_set_decim(${T}State *h, int32_t factor);`, "param-signedness");
  else proto(`int ${P}_set_decim(${T}State *h, uint32_t factor);`);
  proto(`int ${P}_retune(${T}State *h, ${T}Tuning t);`);
  proto(`int ${P}_stats(const ${T}State *h, ${T}Stats *out);`);
  proto(`int ${P}_on_event(${T}State *h, ${T}EventCb cb, void *ctx);`, plant === "callback-mismatch" ? "callback-mismatch" : undefined);
  proto(`size_t ${P}_history_len(const ${T}State *h);`, plant === "return-type-mismatch" ? "return-type-mismatch" : undefined);
  if (plant === "arity-mismatch") proto(`void ${P}_reset(${T}State *h, int hard);`, "arity-mismatch");
  else proto(`void ${P}_reset(${T}State *h);`);
  if (plant === "declaration-without-definition") {
    h.add(`/* Flushes pending output (the Rust side was never written). */`);
    exp("declaration-without-definition", h, h.at(`int ${P}_flush(${T}State *h);`));
  }
  proto(`void ${P}_free(${T}State *h);`);
  h.add(``);
  if (guarded) h.add(`#ifdef __cplusplus`, `}`, `#endif`, ``);
  h.add(`#endif /* ${G} */`);

  // ---------------- C++ block ----------------
  const cls = `${mod}_block`;
  cc.add(
    `// ${scen.title}: block wrapping the Rust ${kdesc} kernel ${idx}.`,
    `#include <cstddef>`,
    `#include <cstdint>`,
    `#include <vector>`,
    `#include "../../include/${scen.id}/${mod}.h"`,
    ``,
    `namespace ${scen.id} {`,
    ``,
    `class ${cls} {`,
    `public:`,
    `    explicit ${cls}(float gain, unsigned ntaps) {`,
    `        ${T}Config cfg{};`,
    `        cfg.gain = gain;`,
    `        cfg.ntaps = ntaps;`,
    `        cfg.center_hz = ${(1000 + Math.floor(r() * 9000)).toFixed(1)};`,
    `        cfg.decim = ${1 + Math.floor(r() * 8)};`,
    `        cfg.flags = 0;`,
    `        state_ = ${P}_new(&cfg);`,
    `        ${P}_on_event(state_, &${cls}::on_event, this);`,
    `    }`,
    `    ~${cls}() { ${P}_free(state_); }`,
    `    ${cls}(const ${cls} &) = delete;`,
    `    ${cls} &operator=(const ${cls} &) = delete;`,
    ``,
    `    int work(int noutput_items, const void *in_buf, void *out_buf) {`,
    `        const float *in = static_cast<const float *>(in_buf);`,
    `        float *out = static_cast<float *>(out_buf);`,
    `        if (${P}_process(state_, in, out, static_cast<size_t>(noutput_items)) != 0) return 0;`,
    `        ${P}_normalize(out, static_cast<size_t>(noutput_items));`,
    `        smooth_0(out, noutput_items);`,
    `        return noutput_items;`,
    `    }`,
    ``,
    `    bool set_gain(float db) { return ${P}_set_gain(state_, db) == 0; }`,
    `    bool set_decim(unsigned factor) { return ${P}_set_decim(state_, factor) == 0; }`,
    `    bool retune(double center_hz, double bw_hz) {`,
    `        ${T}Tuning t{center_hz, bw_hz};`,
    `        return ${P}_retune(state_, t) == 0;`,
    `    }`,
    `    ${T}Stats stats() const {`,
    `        ${T}Stats s{};`,
    `        ${P}_stats(state_, &s);`,
    `        return s;`,
    `    }`,
    `    size_t history() const { return ${P}_history_len(state_); }`,
    plant === "arity-mismatch" ? `    void reset() { ${P}_reset(state_, 1); events_.clear(); }` : `    void reset() { ${P}_reset(state_); events_.clear(); }`,
    ``,
    `private:`,
    `    static void on_event(void *ctx, uint64_t index, float level) {`,
    `        auto *self = static_cast<${cls} *>(ctx);`,
    `        self->events_.push_back(index);`,
    `        if (level > self->level_) self->level_ = level;`,
    `    }`,
    ``,
  );
  const nC = 2 + Math.floor(r() * 4);
  for (let i = 0; i < nC; i++) cc.add(...cppHelper(r, `smooth_${i}`));
  cc.add(`    ${T}State *state_;`, `    std::vector<uint64_t> events_;`, `    float level_ = 0.0f;`, `};`, ``, `}  // namespace ${scen.id}`);
  return { files: [rs, h, cc], expect };
}

export function generate({ lines, out, seed = 7 }) {
  const r = rng(seed);
  fs.rmSync(out, { recursive: true, force: true });
  fs.mkdirSync(out, { recursive: true });
  const crates = new Map(); // crate name → module names
  const expected = [];
  let total = 0;
  let files = 0;
  let unit = 0;
  const counts = Object.fromEntries(PLANT_KINDS.map((k) => [k, 0]));
  // Plant kinds are dealt from a shuffled deck so that every kind appears in small workspaces.
  let deck = [];
  const nextPlant = () => {
    if (deck.length === 0) {
      deck = [...PLANT_KINDS];
      for (let i = deck.length - 1; i > 0; i--) { const j = Math.floor(r() * (i + 1)); [deck[i], deck[j]] = [deck[j], deck[i]]; }
    }
    return deck.pop();
  };
  const perCrate = 40;
  while (total < lines) {
    const scen = SCENARIOS[unit % SCENARIOS.length];
    const kind = KINDS[Math.floor(r() * KINDS.length)];
    const idx = unit;
    const nth = Math.floor(unit / SCENARIOS.length);
    const crate = `${scen.id}_kernels_${Math.floor(nth / perCrate)}`;
    const plant = unit % 3 === 1 ? nextPlant() : undefined;
    if (plant) counts[plant]++;
    const u = genUnit(r, scen, kind, idx, crate, plant);
    for (const f of u.files) {
      const p = path.join(out, f.rel);
      fs.mkdirSync(path.dirname(p), { recursive: true });
      fs.writeFileSync(p, f.text());
      total += f.lines.length;
      files++;
    }
    expected.push(...u.expect);
    const mods = crates.get(crate) ?? [];
    mods.push(`${kind[0]}${idx}`);
    crates.set(crate, mods);
    unit++;
  }
  for (const [crate, mods] of crates) {
    const scen = SCENARIOS.find((s) => crate.startsWith(s.id + "_"));
    const lib = [
      `//! ${scen.title}: signal-processing kernels exported to the C++ blocks.`,
      `#![allow(dead_code)]`,
      ``,
      ...mods.map((m) => `pub mod ${m};`),
    ];
    fs.writeFileSync(path.join(out, `crates/${crate}/src/lib.rs`), lib.join("\n") + "\n");
    fs.writeFileSync(path.join(out, `crates/${crate}/Cargo.toml`), `[package]\nname = "${crate}"\nversion = "0.1.0"\nedition = "2021"\n\n[lib]\ncrate-type = ["staticlib", "rlib"]\n`);
    total += lib.length;
    files++;
  }
  expected.sort((a, b) => a.file.localeCompare(b.file) || a.line - b.line || a.rule.localeCompare(b.rule));
  const manifest = { seed, lines: total, files, units: unit, crates: [...crates.keys()], plantedByKind: counts, expected };
  fs.writeFileSync(path.join(out, "planted.json"), JSON.stringify(manifest, null, 1) + "\n");
  return manifest;
}

function parseArgs(argv) {
  const o = { lines: 10_000, seed: 7, out: undefined };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === "--lines") o.lines = Number(String(argv[++i]).replace(/_/g, "").replace(/k$/i, "000").replace(/m$/i, "000000"));
    else if (a === "--seed") o.seed = Number(argv[++i]);
    else if (a === "--out") o.out = argv[++i];
    else throw new Error(`unknown argument ${a} (usage: gen-bench --lines N [--out DIR] [--seed S])`);
  }
  if (!Number.isFinite(o.lines) || o.lines <= 0) throw new Error("--lines needs a positive number");
  o.out = path.resolve(o.out ?? path.join(ROOT, "bench-out", `ws-${o.lines}`));
  return o;
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const o = parseArgs(process.argv.slice(2));
  const m = generate(o);
  console.log(`wrote ${m.files} files, ${m.lines} lines, ${m.units} units, ${m.expected.length} planted findings to ${o.out}`);
}
