// Reading files a repository controls: source text (encodings, line endings) and the small files
// ferrule reads by name (`.ferrule.toml`, baselines). A committed file may be a named pipe, a link
// to /dev/zero or to a file outside the project; none of these may hang or balloon a run.

import * as fs from "node:fs";
import * as path from "node:path";
import type { Diagnostic0 } from "../model/types.js";

/** Decoded source text, and a notice when the bytes were not plain UTF-8. */
export interface Decoded {
  text: string;
  note?: string;
}

/**
 * Bytes → text as the compilers read it: UTF-8 (a BOM is dropped), UTF-16 with a BOM (LE or BE)
 * decoded, and classic Mac line endings (CR alone) turned into LF one for one, so every offset
 * and column stays where it was and tree-sitter counts the lines the compilers count (C11 §5.1.1.2
 * leaves the end-of-line mapping to the implementation; gcc and clang take CR, LF and CRLF).
 * Bytes that are not valid UTF-8 are decoded with replacement characters and noted.
 */
export function decodeSource(buf: Uint8Array): Decoded {
  let text: string;
  let note: string | undefined;
  if (buf.length >= 2 && buf[0] === 0xff && buf[1] === 0xfe) {
    text = new TextDecoder("utf-16le").decode(buf.subarray(2));
    note = "decoded as UTF-16 (little-endian, byte order mark)";
  } else if (buf.length >= 2 && buf[0] === 0xfe && buf[1] === 0xff) {
    text = new TextDecoder("utf-16be").decode(buf.subarray(2));
    note = "decoded as UTF-16 (big-endian, byte order mark)";
  } else {
    const start = buf.length >= 3 && buf[0] === 0xef && buf[1] === 0xbb && buf[2] === 0xbf ? 3 : 0;
    try {
      text = new TextDecoder("utf-8", { fatal: true }).decode(buf.subarray(start));
    } catch {
      text = new TextDecoder("utf-8").decode(buf.subarray(start));
      note = "not valid UTF-8: undecodable bytes read as U+FFFD (positions after them may be off)";
    }
  }
  if (text.includes("\r")) text = text.replace(/\r(?!\n)/g, "\n");
  return note ? { text, note } : { text };
}

/** The one notice for a file whose bytes needed decoding (rule `file-encoding`, info). */
export function encodingNotice(file: string, note: string): Diagnostic0 {
  return { rule: "file-encoding", severity: "info", message: `${file}: ${note}`, range: { file, line: 0, col: 0, endLine: 0, endCol: 0 } };
}

/** Reads a source file; see decodeSource. Throws what fs throws. */
export function readSource(file: string): Decoded {
  return decodeSource(fs.readFileSync(file));
}

export class UnsafeFileError extends Error {}

/** The largest `.ferrule.toml` or baseline ferrule reads (a baseline of ~50,000 findings). */
export const SMALL_FILE_LIMIT = 16 * 2 ** 20;

/**
 * Reads a small file named by the user or found in the repository, refusing anything that is not
 * a regular file (a FIFO would block forever, a device would never end), a symbolic link that
 * leaves `root` (when given), and files above `limit` bytes. The message says why, for an error
 * that names the file. Checked on the opened descriptor, so a swap between check and read does not
 * get past it.
 */
export function readSmallRegularFile(file: string, opts: { root?: string; limit?: number } = {}): string {
  const limit = opts.limit ?? SMALL_FILE_LIMIT;
  const lst = fs.lstatSync(file);
  if (lst.isSymbolicLink()) {
    const real = fs.realpathSync(file);
    if (opts.root) {
      const root = fs.realpathSync(opts.root);
      if (real !== root && !real.startsWith(root.endsWith(path.sep) ? root : root + path.sep)) {
        throw new UnsafeFileError(`a symbolic link to ${real}, outside the project; not read`);
      }
    }
  } else if (!lst.isFile()) {
    throw new UnsafeFileError(`not a regular file (${kindOf(lst)}); not read`);
  }
  // O_NONBLOCK: opening a FIFO swapped in after the check returns at once instead of blocking.
  const fd = fs.openSync(file, fs.constants.O_RDONLY | (fs.constants.O_NONBLOCK ?? 0));
  try {
    const st = fs.fstatSync(fd);
    if (!st.isFile()) throw new UnsafeFileError(`not a regular file (${kindOf(st)}); not read`);
    if (st.size > limit) throw new UnsafeFileError(`${st.size} bytes, above the limit of ${limit} bytes for this file; not read`);
    const buf = Buffer.alloc(st.size);
    let off = 0;
    while (off < st.size) {
      const n = fs.readSync(fd, buf, off, st.size - off, off);
      if (n === 0) break;
      off += n;
    }
    return decodeSource(buf.subarray(0, off)).text;
  } finally {
    fs.closeSync(fd);
  }
}

function kindOf(st: fs.Stats): string {
  if (st.isFIFO()) return "a named pipe";
  if (st.isCharacterDevice()) return "a character device";
  if (st.isBlockDevice()) return "a block device";
  if (st.isSocket()) return "a socket";
  if (st.isDirectory()) return "a folder";
  return "not a file";
}
