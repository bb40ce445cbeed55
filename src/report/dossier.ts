import type { NormalizedSpec } from "../spec/types.js";
import type { Results } from "../analysis/types.js";
import { buildFigures } from "./figures/index.js";
import { renderSvg } from "./render/svg.js";
import { assembleDossierHtml } from "./assemble.js";
import type { FigureView, RenderOptions } from "./view/index.js";

export interface RenderedFigure extends FigureView {
  /** The vega-lite spec the SVG was rendered from, for users who restyle the figure. */
  vegaLite: Record<string, unknown>;
}

export interface Dossier {
  html: string;
  figures: RenderedFigure[];
}

/** Results → figures (vega-lite → SVG) → HTML. No file is touched here. */
export async function buildDossier(
  spec: NormalizedSpec,
  results: Results,
  options: RenderOptions,
): Promise<Dossier> {
  const built = buildFigures(results, spec);
  const figures: RenderedFigure[] = [];
  for (const [k, f] of built.entries()) {
    figures.push({
      id: f.id,
      number: k + 1,
      title: f.title,
      caption: f.caption,
      svg: await renderSvg(f.spec),
      vegaLite: f.spec,
    });
  }
  return { html: assembleDossierHtml(spec, results, figures, options), figures };
}
