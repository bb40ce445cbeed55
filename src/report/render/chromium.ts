import { accessSync, constants, statSync } from "node:fs";

/** The environment variable that names the Chromium (or Chrome) executable to print with. */
export const CHROMIUM_ENV = "KEEL_CHROMIUM";

/**
 * Where Debian, Ubuntu and Google's packages put the browser, in the order we try them
 * (common practice). /usr/bin/chromium is Debian's launcher script, which execs the binary in
 * /usr/lib/chromium.
 */
export const CHROMIUM_LOCATIONS: readonly string[] = [
  "/usr/bin/chromium",
  "/usr/bin/chromium-browser",
  "/usr/lib/chromium/chromium",
  "/usr/bin/google-chrome",
  "/usr/bin/google-chrome-stable",
];

/**
 * The Chromium to print PDFs with: the path in KEEL_CHROMIUM when that variable is set, else the
 * first executable file among `locations`; null when there is none.
 *
 * A KEEL_CHROMIUM that names no executable gives null rather than a fallback, so a mistyped path
 * is noticed instead of silently printing with some other browser.
 */
export function findChromium(
  env: NodeJS.ProcessEnv,
  locations: readonly string[] = CHROMIUM_LOCATIONS,
): string | null {
  const chosen = env[CHROMIUM_ENV]?.trim();
  if (chosen) return isExecutableFile(chosen) ? chosen : null;
  return locations.find(isExecutableFile) ?? null;
}

function isExecutableFile(path: string): boolean {
  try {
    accessSync(path, constants.X_OK);
    return statSync(path).isFile(); // a folder is "executable" too
  } catch {
    return false;
  }
}
