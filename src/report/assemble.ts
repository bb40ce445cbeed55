import type { NormalizedSpec } from "../spec/types.js";
import type { Results } from "../analysis/types.js";
import { mathStylesheet } from "./math.js";
import { loadTemplates } from "./templates.js";
import { buildDossierView, type FigureView, type RenderOptions } from "./view/index.js";

/** The dossier's HTML: a pure function of (spec, results, rendered figures, options). */
export function assembleDossierHtml(
  spec: NormalizedSpec,
  results: Results,
  figures: FigureView[],
  options: RenderOptions,
): string {
  const templates = loadTemplates();
  const view = buildDossierView(spec, results, figures, options);
  const css = `${mathStylesheet()}\n${templates.css}`;
  return templates.render({ ...view, css });
}
