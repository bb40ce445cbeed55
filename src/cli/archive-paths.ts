import { lstatSync, realpathSync } from "node:fs";
import { isAbsolute, join, relative, sep } from "node:path";

/** What a manifest's `files` must be: names to SHA-256 hex digests. */
const SHA256_HEX = /^[0-9a-f]{64}$/;

/**
 * The manifest's file list when it has the shape keel writes (an object of names to SHA-256
 * digests), or the reason it has not: a tampered manifest is a failed verification, not a fault.
 */
export function manifestFiles(files: unknown): Record<string, string> | string {
  if (files === null || typeof files !== "object" || Array.isArray(files))
    return "its 'files' is not an object of file names and SHA-256 digests";
  for (const [name, digest] of Object.entries(files as Record<string, unknown>))
    if (typeof digest !== "string" || !SHA256_HEX.test(digest))
      return `the digest of '${name}' is not a SHA-256 hex string`;
  return files as Record<string, string>;
}

/**
 * Where a manifest entry lives inside the archive folder, or why it may not be read: an absolute
 * name, a `..` step, a back-slash or a NUL, a name that resolves (through a symbolic link) outside
 * the folder, or anything but a regular file. verify never reads a byte outside the folder.
 */
export function confinedPath(folder: string, name: string): { path: string } | { refused: string } {
  if (name === "" || isAbsolute(name) || name.includes("\\") || name.includes("\0"))
    return { refused: "not a plain relative file name" };
  if (name.split("/").some((part) => part === ".." || part === "." || part === ""))
    return { refused: "its path steps out of or around the archive folder" };
  const path = join(folder, name);
  let stat;
  try {
    stat = lstatSync(path);
  } catch {
    return { path }; // missing: reported as such by the caller
  }
  if (stat.isSymbolicLink()) {
    const root = realpathSync(folder);
    let real: string;
    try {
      real = realpathSync(path);
    } catch {
      return { refused: "a symbolic link to nothing" };
    }
    const rel = relative(root, real);
    if (rel.startsWith("..") || isAbsolute(rel) || rel.split(sep)[0] === "..")
      return { refused: "a symbolic link leading outside the archive folder" };
    if (!lstatSync(real).isFile()) return { refused: "not a regular file" };
    return { path: real };
  }
  if (!stat.isFile()) return { refused: "not a regular file" };
  return { path };
}
