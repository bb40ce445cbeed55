/**
 * pdfinfo and pdftotext (Debian's poppler-utils) as an outside reader of the PDFs we print.
 * Tests check `popplerAvailable` and skip, with a message, when the tools are missing.
 */
import { execFileSync, spawnSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";

export const popplerAvailable =
  spawnSync("pdfinfo", ["-v"]).status === 0 && spawnSync("pdftotext", ["-v"]).status === 0;

export const popplerMissingMessage =
  "pdfinfo/pdftotext not found: install poppler-utils (apt-get install poppler-utils) to run these checks";

/** pdfinfo's "Key: value" lines as a record, e.g. info.Pages === "3". */
export function pdfinfo(pdf: Uint8Array): Record<string, string> {
  const text = withPdfFile(pdf, (file) => execFileSync("pdfinfo", [file], { encoding: "utf8" }));
  const info: Record<string, string> = {};
  for (const line of text.split("\n")) {
    const match = /^([^:]+):\s*(.*)$/.exec(line);
    if (match) info[match[1].trim()] = match[2].trim();
  }
  return info;
}

/** Page size in points from pdfinfo's "Page size: 595.92 x 841.92 pts (A4)" line, and poppler's own name for it. */
export function pdfPageSize(info: Record<string, string>): { width: number; height: number; name: string | null } {
  const match = /^([\d.]+) x ([\d.]+) pts(?: \(([^)]+)\))?/.exec(info["Page size"] ?? "");
  if (!match) throw new Error(`pdfinfo printed no page size: ${JSON.stringify(info["Page size"])}`);
  return { width: Number(match[1]), height: Number(match[2]), name: match[3] ?? null };
}

/** The PDF's text, pages separated by form feeds; `layout` keeps the columns of tables. */
export function pdftotext(pdf: Uint8Array, options: { layout?: boolean } = {}): string {
  const args = [...(options.layout ? ["-layout"] : []), "-enc", "UTF-8"];
  return withPdfFile(pdf, (file) => execFileSync("pdftotext", [...args, file, "-"], { encoding: "utf8" }));
}

function withPdfFile<T>(pdf: Uint8Array, read: (file: string) => T): T {
  const folder = mkdtempSync(join(tmpdir(), "keel-poppler-"));
  try {
    const file = join(folder, "doc.pdf");
    writeFileSync(file, pdf);
    return read(file);
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}
