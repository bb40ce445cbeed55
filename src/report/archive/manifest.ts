import { createHash } from "node:crypto";
import {
  PDFArray,
  PDFDict,
  PDFDocument,
  PDFHexString,
  PDFName,
  PDFRawStream,
  PDFString,
  decodePDFRawStream,
} from "pdf-lib";

/**
 * The archive, part 2 of 3: a manifest of SHA-256 hashes over every file of a build, and the PDF
 * carrying the spec, results and manifest as embedded files, so the single PDF is a complete
 * record. serialize.ts writes results.json; compare.ts sets archived results against a re-run.
 */

/** manifest.json: what was built, from what, by which keel, and the hash of every file. */
export interface Manifest {
  keel: string;
  node: string;
  /** SHA-256 of the package-lock.json keel was installed from, or null when none ships with it. */
  lockfileSha256: string | null;
  spec: { file: string; sha256Canonical: string };
  options: Record<string, unknown>;
  /** keel's passes use no random numbers; the claim sampler's Halton sequence starts at index 1. */
  seeds: Record<string, number>;
  /** Relative path → SHA-256 of its bytes. The copy inside the PDF lacks the entry for dossier.pdf itself. */
  files: Record<string, string>;
}

/** Files embedded in the PDF, by name. */
export const EMBEDDED_FILES = ["spec.json", "results.json", "manifest.json"] as const;

/** SHA-256 of text (as UTF-8) or bytes, in lower-case hex. */
export function sha256(bytes: string | Uint8Array): string {
  return createHash("sha256").update(bytes).digest("hex");
}

/** manifest.json text in the one form keel writes (files sorted by path), so verify can compare bytes. */
export function manifestText(manifest: Manifest): string {
  const files = Object.fromEntries(
    Object.keys(manifest.files)
      .sort()
      .map((k) => [k, manifest.files[k]]),
  );
  return JSON.stringify({ ...manifest, files }, null, 2) + "\n";
}

/**
 * Embeds the archive files in the PDF and fixes its dates, producer and creator, so the same
 * inputs give the same bytes (Chromium stamps its own clock otherwise).
 */
export async function embedArchive(
  pdf: Uint8Array,
  files: Record<string, string>,
  dateEpoch: number,
  title: string,
): Promise<Uint8Array> {
  const doc = await PDFDocument.load(pdf, { updateMetadata: false });
  const date = new Date(dateEpoch * 1000);
  for (const name of Object.keys(files)) {
    await doc.attach(new TextEncoder().encode(files[name]), name, {
      mimeType: "application/json",
      description: `keel archive: ${name}`,
      creationDate: date,
      modificationDate: date,
    });
  }
  doc.setTitle(title);
  doc.setProducer("keel (pdf-lib)");
  doc.setCreator("keel");
  doc.setCreationDate(date);
  doc.setModificationDate(date);
  return doc.save({ useObjectStreams: false });
}

/** A PDF string object's text, or null for any other object. */
function pdfText(value: unknown): string | null {
  if (value instanceof PDFString || value instanceof PDFHexString) return value.decodeText();
  return null;
}

/** The files embedded in a PDF, by name (read through the document's EmbeddedFiles name tree). */
export async function readEmbedded(pdf: Uint8Array): Promise<Record<string, Uint8Array>> {
  // throwing, not pdf-lib's default of printing a warning and skipping: a damaged object is a
  // finding for verify to report, not console noise beside its answer
  const doc = await PDFDocument.load(pdf, { updateMetadata: false, throwOnInvalidObject: true });
  const out: Record<string, Uint8Array> = {};
  const names = doc.catalog.lookupMaybe(PDFName.of("Names"), PDFDict);
  const tree = names?.lookupMaybe(PDFName.of("EmbeddedFiles"), PDFDict);
  if (!tree) return out;
  const visit = (node: PDFDict) => {
    const leaf = node.lookupMaybe(PDFName.of("Names"), PDFArray);
    if (leaf) {
      for (let k = 0; k + 1 < leaf.size(); k += 2) {
        const name = pdfText(leaf.lookup(k));
        const spec = leaf.lookup(k + 1, PDFDict);
        const ef = spec.lookupMaybe(PDFName.of("EF"), PDFDict);
        const stream = ef?.lookup(PDFName.of("F"));
        if (name && stream instanceof PDFRawStream) out[name] = decodePDFRawStream(stream).decode();
      }
    }
    const kids = node.lookupMaybe(PDFName.of("Kids"), PDFArray);
    if (kids) for (let k = 0; k < kids.size(); k++) visit(kids.lookup(k, PDFDict));
  };
  visit(tree);
  return out;
}
