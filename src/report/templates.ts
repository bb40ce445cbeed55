import Handlebars from "handlebars";
import { readdirSync, readFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";

/** The templates folder ships beside dist/ and src/ in the package. */
export const TEMPLATES_DIR = join(dirname(fileURLToPath(import.meta.url)), "..", "..", "templates");

export interface TemplateSet {
  render: (view: object) => string;
  css: string;
}

let cached: TemplateSet | null = null;

/** Compiles the layout and partials once; templates never see user text except as escaped data. */
export function loadTemplates(dir = TEMPLATES_DIR): TemplateSet {
  if (cached && dir === TEMPLATES_DIR) return cached;
  const hb = Handlebars.create();
  hb.registerHelper("eq", (a: unknown, b: unknown) => a === b);
  hb.registerHelper("lt", (a: number, b: number) => a < b);
  hb.registerHelper("gt", (a: number, b: number) => a > b);
  const partials = join(dir, "partials");
  for (const file of readdirSync(partials).sort()) {
    if (file.endsWith(".hbs"))
      hb.registerPartial(file.slice(0, -4), readFileSync(join(partials, file), "utf8"));
  }
  const layout = hb.compile(readFileSync(join(dir, "layout.hbs"), "utf8"), {
    strict: false,
    noEscape: false,
  });
  const set = { render: (view: object) => layout(view), css: readFileSync(join(dir, "dossier.css"), "utf8") };
  if (dir === TEMPLATES_DIR) cached = set;
  return set;
}
