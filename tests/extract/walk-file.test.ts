// walkFile (the whole-file walks of the C/C++ extractors, which leave function bodies out) takes
// its nodes from one search per tree that drops what lies in function bodies. Each walk must visit
// exactly the nodes walkTypes visits with a search of its own, in the same order: checked here for
// the walks' type lists and return rules, on every C/C++ fixture and on source whose bodies hold
// lambdas, local classes with member functions, nested blocks and calls.
import { beforeAll, describe, expect, test } from "vitest";
import * as fs from "node:fs";
import * as path from "node:path";
import { initParsers, parseText, langOf, type Node } from "../../server/src/parse/parser.js";
import { forgetWalks, walkFile, walkTypes } from "../../server/src/extract/common.js";

beforeAll(async () => {
  await initParsers();
});

const C_VISITED = [
  "preproc_include", "preproc_def", "preproc_call", "function_definition", "declaration", "field_declaration", "type_definition",
  "struct_specifier", "union_specifier", "enum_specifier", "call_expression", "static_assert_declaration", "class_specifier",
  "template_declaration", "compound_statement",
];
/** The type lists and return rules of the whole-file walks in c.ts, macros.ts and the plugins. */
const WALKS: [string, string[], (n: Node) => boolean | void][] = [
  ["c.ts", C_VISITED, (n) => (["struct_specifier", "union_specifier", "enum_specifier", "call_expression"].includes(n.type) ? undefined : false)],
  ["macros", ["preproc_def", "function_definition", "compound_statement"], () => false],
  ["buffers consts", ["class_specifier", "struct_specifier", "preproc_def", "enumerator", "compound_statement"], (n) => (n.type === "compound_statement" ? false : undefined)],
  ["buffers globals", ["function_definition", "class_specifier", "compound_statement", "declaration"], () => false],
  ["buffers fns", ["function_definition"], () => false],
  ["nullability", ["compound_statement", "parameter_declaration"], () => false],
  ["ownership", ["class_specifier", "struct_specifier", "function_definition"], (n) => (n.type === "function_definition" ? false : undefined)],
];

function visits(text: string, lang: "c" | "cpp", useFile: boolean): string[][] {
  const tree = parseText(lang, text);
  try {
    return WALKS.map(([, types, rule]) => {
      const out: string[] = [];
      const visit = (n: Node) => {
        out.push(`${n.type}@${n.startIndex}-${n.endIndex}`);
        return rule(n);
      };
      if (useFile) walkFile(tree.rootNode, types, visit);
      else walkTypes(tree.rootNode, types, visit);
      return out;
    });
  } finally {
    forgetWalks(tree);
    tree.delete();
  }
}

function sources(dir: string): string[] {
  const out: string[] = [];
  for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
    const p = path.join(dir, e.name);
    if (e.isDirectory()) out.push(...sources(p));
    else if (langOf(p) === "c" || langOf(p) === "cpp") out.push(p);
  }
  return out;
}

const NESTED = `
#include <stddef.h>
#define GAIN 4
struct hydrophone { float gain; int ch; };
static const float taps[GAIN] = { 1, 2, 3, 4 };
namespace sonar {
class beamformer {
 public:
  void steer(float *w, size_t n) {
    struct local { int k; void bump() { k += helper(k); } };
    auto f = [&](int i) { struct inner { void go() { call_inner(); } }; return w[i] * 2.0f; };
    for (size_t i = 0; i < n; i++) { { w[i] = f((int)i); } if (n) { scale(w, n); } }
  }
  int taps_used(void) const { return GAIN; }
};
}
extern "C" int sonar_steer(float *w, size_t n) { sonar::beamformer b; b.steer(w, n); return 0; }
auto top_lambda = [](int x) { struct in_lambda { void m() { deep_call(); } }; return x; };
int after(int a) try { return a; } catch (...) { { return -1; } }
`;

describe("walkFile", () => {
  test("visits what walkTypes visits, on nested bodies", () => {
    for (const lang of ["c", "cpp"] as const) {
      const full = visits(NESTED, lang, false);
      expect(visits(NESTED, lang, true)).toEqual(full);
    }
    // real outcomes, not only agreement: the body-skipping walks reach the members and the
    // functions of the class in the lambda at file scope, and no call in a body
    const [cWalk, , , , fns] = visits(NESTED, "cpp", true);
    expect(cWalk!.some((v) => v.startsWith("call_expression@"))).toBe(false);
    // steer, taps_used, sonar_steer, m (in the class in the file-scope lambda), after; not bump or go
    const at = (name: string) => NESTED.indexOf(name);
    expect(fns!.map((v) => Number(v.split("@")[1]!.split("-")[0]))).toEqual([
      at("void steer"), at("int taps_used"), at("int sonar_steer"), at("void m()"), at("int after"),
    ]);
  });

  test("visits what walkTypes visits, on every C/C++ fixture", () => {
    const files = sources(path.resolve(__dirname, "../../test-fixtures"));
    expect(files.length).toBeGreaterThan(20);
    for (const f of files) {
      const text = fs.readFileSync(f, "utf8");
      for (const lang of ["c", "cpp"] as const) {
        expect(visits(text, lang, true), `${f} as ${lang}`).toEqual(visits(text, lang, false));
      }
    }
  });

  test("a walk that would enter a function body is refused", () => {
    const tree = parseText("c", "int f(int a) { return g(a); }\nint h(void) { return 1; }\n");
    try {
      expect(() => walkFile(tree.rootNode, ["function_definition", "call_expression"], () => undefined)).toThrow(/must return false/);
    } finally {
      forgetWalks(tree);
      tree.delete();
    }
  });
});
