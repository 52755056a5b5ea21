// Reads .vsix files (zip archives) with yauzl (the zip reader @vscode/vsce itself uses), so the
// tests need no `unzip` binary on the machine.
import * as fs from "node:fs";
import * as path from "node:path";
import { createRequire } from "node:module";

const require_ = createRequire(import.meta.url);
// eslint-disable-next-line @typescript-eslint/no-explicit-any
const yauzl: any = require_("yauzl");

export interface ZipEntry {
  name: string;
  size: number;
}

function open(file: string): Promise<any> {
  return new Promise((resolve, reject) => yauzl.open(file, { lazyEntries: true }, (err: Error | null, zf: unknown) => (err ? reject(err) : resolve(zf))));
}

export async function listZip(file: string): Promise<ZipEntry[]> {
  const zf = await open(file);
  const out: ZipEntry[] = [];
  await new Promise<void>((resolve, reject) => {
    zf.on("entry", (e: { fileName: string; uncompressedSize: number }) => {
      out.push({ name: e.fileName, size: e.uncompressedSize });
      zf.readEntry();
    });
    zf.on("end", () => resolve());
    zf.on("error", reject);
    zf.readEntry();
  });
  zf.close();
  return out;
}

/** Extracts every entry under `prefix` (e.g. "extension/") into dir, without the prefix. */
export async function unzipTo(file: string, dir: string, prefix = ""): Promise<void> {
  const zf = await open(file);
  await new Promise<void>((resolve, reject) => {
    zf.on("entry", (e: { fileName: string }) => {
      if (e.fileName.endsWith("/") || !e.fileName.startsWith(prefix)) {
        zf.readEntry();
        return;
      }
      const dest = path.join(dir, e.fileName.slice(prefix.length));
      if (!dest.startsWith(path.resolve(dir) + path.sep)) {
        reject(new Error(`zip entry escapes the target folder: ${e.fileName}`));
        return;
      }
      fs.mkdirSync(path.dirname(dest), { recursive: true });
      zf.openReadStream(e, (err: Error | null, rs: NodeJS.ReadableStream) => {
        if (err) return reject(err);
        const ws = fs.createWriteStream(dest);
        rs.pipe(ws);
        ws.on("finish", () => zf.readEntry());
        ws.on("error", reject);
      });
    });
    zf.on("end", () => resolve());
    zf.on("error", reject);
    zf.readEntry();
  });
  zf.close();
}
