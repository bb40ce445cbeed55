import type { NormalizedSpec } from "../../spec/types.js";
import type { Results } from "../../analysis/types.js";
import { formatDate, formatUnit } from "../format.js";
import { STANDARD_CAUTIONS, diagnosticWords } from "../words/index.js";
import {
  numberFiguresInReadingOrder,
  type FigureView,
  type RenderOptions,
  type ViewInput,
} from "./common.js";
import { buildSummaryView } from "./summary.js";
import { buildModelView } from "./model.js";
import { buildEquilibriaView } from "./equilibria.js";
import { buildPortraitView } from "./portrait.js";
import { buildBasinsView } from "./basins.js";
import { buildConditionsView } from "./conditions.js";
import { buildMethodsView } from "./methods.js";

export type { FigureView, RenderOptions } from "./common.js";

/** Everything the templates print, one builder per dossier section; user text stays plain (the template escapes it). */
export function buildDossierView(
  spec: NormalizedSpec,
  results: Results,
  figures: FigureView[],
  options: RenderOptions,
) {
  const numbered = numberFiguresInReadingOrder(figures, results);
  const input: ViewInput = {
    spec,
    results,
    options,
    figure: (id) => numbered.find((f) => f.id === id) ?? null,
  };
  const { traceDeterminant, ...equilibria } = buildEquilibriaView(input);
  const { portrait, ...portraitSection } = buildPortraitView(input);
  return {
    lang: "en",
    title: spec.title,
    id: spec.id,
    authors: spec.authors.join(", "),
    organisation: spec.organisation,
    purpose: spec.purpose,
    date: formatDate(options.dateEpoch),
    sha256: spec.sha256,
    version: results.keel,
    paper: options.paper,
    timeUnit: spec.timeUnit,
    summary: buildSummaryView(input),
    model: buildModelView(input),
    ...equilibria,
    ...portraitSection,
    basins: buildBasinsView(input),
    conditions: buildConditionsView(input),
    figures: { portrait, traceDeterminant },
    diagnostics: results.diagnostics.map((d) => ({ stage: d.stage, message: diagnosticWords(d) })),
    methods: buildMethodsView(input),
    cautions: [...STANDARD_CAUTIONS, ...spec.cautions],
    unitOf: Object.fromEntries(spec.states.map((s) => [s.name, formatUnit(s.unit)])),
  };
}

export type DossierView = ReturnType<typeof buildDossierView>;
