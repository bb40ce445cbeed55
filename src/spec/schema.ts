import { z } from "zod";
import {
  DEFAULT_BASIN_COARSE,
  DEFAULT_BASIN_RESOLUTION,
  DEFAULT_CLAIM_CONDITION_SAMPLES,
  DEFAULT_CLAIM_NEAR,
} from "./defaults.js";

/**
 * The spec contract (see DEVELOPERS.md). Each key carries its documentation, which flows into
 * the generated JSON Schema (schema/keel-spec.schema.json) and so into editors.
 * Cross-field rules (names, windows, ranges) live in validate.ts: zod checks shape here.
 */
const finite = () => z.number().refine(Number.isFinite, { message: "expected a finite number" });

const interval = (what: string) => z.tuple([finite(), finite()]).describe(`${what} as [lo, hi], lo < hi.`);

export const StateSpecSchema = z
  .strictObject({
    name: z.string().describe("Identifier used in the equations (letter, then letters, digits or '_')."),
    label: z.string().optional().describe("What the state measures, in words, for the dossier."),
    unit: z.string().optional().describe("Unit of the state, e.g. 'fish' or 'g/m^2'."),
    min: finite().describe("Lower bound of the feasible region (a population is at least 0)."),
    max: finite().describe("Upper bound of the feasible region."),
    population: z
      .boolean()
      .optional()
      .describe(
        "The state is a population (a count, biomass or density of living things). When every state is, the dossier names equilibria as populations: 'coexistence', 'N only', 'all absent'. Default false: neutral words ('all states positive', 'only N positive', 'the origin').",
      ),
  })
  .describe("One state variable of the model.");

export const ParameterSpecSchema = z
  .strictObject({
    name: z.string().describe("Identifier used in the equations."),
    value: finite().describe("Nominal (current) value, in the parameter's unit."),
    unit: z.string().optional().describe("Unit, e.g. '1/year'."),
    label: z.string().optional().describe("Meaning of the parameter, in words."),
    source: z.string().optional().describe("Where the value comes from (study, estimate, or 'invented')."),
    range: interval(
      "Plausible interval, used by threshold search and uncertainty; must contain value",
    ).optional(),
  })
  .describe("One model parameter.");

export const ScenarioSpecSchema = z
  .strictObject({
    name: z.string().min(1).describe("Short name of the scenario, e.g. 'survey-2025'."),
    label: z.string().optional().describe("Description of the scenario."),
    initial: z.record(z.string(), finite()).describe("Starting value of every state, inside the window."),
    horizon: finite()
      .refine((v) => v > 0, { message: "the horizon must be positive" })
      .describe("How far ahead to integrate, in the model's time unit."),
  })
  .describe("A starting state whose trajectory the dossier follows.");

export const AssumptionSpecSchema = z
  .strictObject({
    text: z.string().min(1).describe("The assumption in words."),
    condition: z
      .string()
      .optional()
      .describe("Optional machine-checkable inequality between parameters, e.g. 'K2 < r1/a12'."),
  })
  .describe("An assumption the analysis rests on.");

const pointSchema = z
  .record(z.string(), finite())
  .describe("A point in state space: a value for every state.");
const nearTolerance = z
  .number()
  .positive()
  .max(1)
  .optional()
  .describe(
    `How near counts as near, as a fraction of the window in each state. Default ${DEFAULT_CLAIM_NEAR}.`,
  );
const presenceSchema = z
  .string()
  .min(1)
  .describe(
    "Which states the attractor keeps away from their lower bounds: 'coexistence' (all of them), '<state> only' (e.g. 'S only'), or 'all absent' (none), whether or not the states are populations.",
  );
const claimBase = {
  id: z
    .string()
    .regex(/^[A-Za-z0-9][A-Za-z0-9_.-]*$/, { message: "a claim id is letters, digits, '_', '.' or '-'" })
    .describe("Short id for the claim, quoted in the verdicts."),
  text: z.string().optional().describe("The claim as the plan or paper words it."),
};

export const ClaimSpecSchema = z.discriminatedUnion("kind", [
  z
    .strictObject({
      ...claimBase,
      kind: z.literal("equilibrium-count"),
      count: z.number().int().min(0).describe("The number of equilibria claimed."),
      stableOnly: z.boolean().optional().describe("Count only stable equilibria. Default false."),
    })
    .describe("The window holds this many equilibria."),
  z
    .strictObject({
      ...claimBase,
      kind: z.literal("equilibrium-type"),
      near: pointSchema,
      type: z
        .enum([
          "saddle",
          "stable-node",
          "unstable-node",
          "stable-focus",
          "unstable-focus",
          "center",
          "stable-degenerate-node",
          "unstable-degenerate-node",
          "stable-star",
          "unstable-star",
          "non-hyperbolic",
          "stable",
          "unstable",
        ])
        .describe(
          "The type claimed, in keel's vocabulary; 'stable' or 'unstable' accept any type of that stability.",
        ),
      tolerance: nearTolerance,
    })
    .describe("An equilibrium near this point has this type."),
  z
    .strictObject({
      ...claimBase,
      kind: z.literal("scenario-fate"),
      scenario: z.string().describe("Name of a scenario in the spec."),
      reaches: z.enum(["equilibrium", "cycle"]).describe("What the scenario's trajectory converges to."),
      near: pointSchema.optional().describe("For an equilibrium: the point it is claimed to be near."),
      tolerance: nearTolerance,
    })
    .describe("A scenario converges to an equilibrium near a point, or to a periodic orbit."),
  z
    .strictObject({
      ...claimBase,
      kind: z.literal("parameter-side"),
      parameter: z.string().describe("A parameter with a range."),
      side: z.enum(["below", "above"]).describe("The current value lies below or above the threshold."),
      threshold: z
        .enum(["saddle-node", "transcritical", "hopf", "boundary-crossing", "any"])
        .optional()
        .describe(
          "Kind of the threshold meant; default 'any': the nearest threshold that changes the outcome.",
        ),
    })
    .describe("A parameter lies below or above its threshold for an outcome."),
  z
    .strictObject({
      ...claimBase,
      kind: z.literal("condition-decides"),
      condition: z.string().describe("An inequality between parameters, e.g. 'a12 < K1/K2'."),
      attractor: presenceSchema,
      samples: z
        .number()
        .int()
        .min(8)
        .max(4096)
        .optional()
        .describe(`Parameter points sampled across the ranges. Default ${DEFAULT_CLAIM_CONDITION_SAMPLES}.`),
    })
    .describe(
      "The condition holds exactly when a stable attractor of this kind exists, across the parameter ranges (necessary and sufficient).",
    ),
  z
    .strictObject({
      ...claimBase,
      kind: z.literal("threshold-value"),
      parameter: z.string().describe("A parameter with a range."),
      value: finite().describe("The threshold value claimed."),
      tolerance: z.number().positive().describe("Allowed relative difference, e.g. 0.01 for 1%."),
      threshold: z
        .enum(["saddle-node", "transcritical", "hopf", "boundary-crossing", "any"])
        .optional()
        .describe("Kind of threshold meant. Default 'any'."),
    })
    .describe("A threshold of this parameter lies at this value, within the tolerance."),
]);

export type ClaimSpec = z.infer<typeof ClaimSpecSchema>;

export const KeelSpecSchema = z
  .strictObject({
    $schema: z.string().optional().describe("Path or URI of this JSON Schema, for editors."),
    keel: z.literal(1).describe("Spec format version; currently 1."),
    id: z
      .string()
      .regex(/^[a-z0-9][a-z0-9-]*$/, { message: "an id is a slug: lower-case letters, digits and '-'" })
      .max(80)
      .describe("Slug naming the model; it names the output folder out/<id>/."),
    title: z.string().min(1).describe("Title of the dossier."),
    authors: z.array(z.string()).optional().describe("Authors of the analysis. Default: none."),
    organisation: z.string().optional().describe("Organisation responsible for the analysis."),
    purpose: z.string().optional().describe("Why the analysis is done, in one or two sentences."),
    time: z
      .strictObject({ unit: z.string().min(1).describe("Unit of time, e.g. 'year' or 'day'.") })
      .describe("The model's time axis."),
    states: z
      .array(StateSpecSchema)
      .describe("The state variables (exactly 2: keel analyses planar models)."),
    parameters: z.array(ParameterSpecSchema).optional().describe("The parameters. Default: none."),
    equations: z
      .record(z.string(), z.string())
      .describe(
        "Time derivative of each state in infix maths: numbers, declared names, + - * / ^, parentheses and " +
          "exp, log, sqrt, abs, min, max, sin, cos, tan, tanh, pow.",
      ),
    window: z
      .record(z.string(), interval("Interval of this state analysed and drawn"))
      .optional()
      .describe("Region analysed and drawn, per state. Default: the states' [min, max]."),
    scenarios: z.array(ScenarioSpecSchema).optional().describe("Starting states to follow. Default: none."),
    assumptions: z.array(AssumptionSpecSchema).optional().describe("Assumptions. Default: none."),
    cautions: z
      .array(z.string())
      .optional()
      .describe("Cautions specific to this model, printed in the dossier."),
    claims: z
      .array(ClaimSpecSchema)
      .optional()
      .describe(
        "Statements about the model for keel to check one by one; each gets a verdict. Default: none.",
      ),
    analysis: z
      .strictObject({
        basins: z
          .strictObject({
            resolution: z
              .number()
              .int()
              .min(8)
              .max(4096)
              .optional()
              .describe(`Effective cells per side of the basin map. Default ${DEFAULT_BASIN_RESOLUTION}.`),
            coarse: z
              .number()
              .int()
              .min(4)
              .max(1024)
              .optional()
              .describe(
                `Cells per side of the first uniform pass; resolution/coarse must be a power of two. Default ${DEFAULT_BASIN_COARSE}.`,
              ),
          })
          .optional()
          .describe("Basin map settings."),
        parameters: z
          .array(z.string())
          .optional()
          .describe(
            "Parameters whose thresholds are searched (each needs a range). Default: every parameter with a range.",
          ),
        parameterPairs: z
          .array(z.tuple([z.string(), z.string()]))
          .optional()
          .describe("Pairs of parameters (each with a range) for two-parameter outcome maps. Default: none."),
      })
      .optional()
      .describe("Settings of the analysis passes. Default: keel's defaults."),
  })
  .describe("A keel model spec: one planar ODE model and its context.");

export type KeelSpecInput = z.infer<typeof KeelSpecSchema>;
export type StateSpec = z.infer<typeof StateSpecSchema>;
export type ParameterSpec = z.infer<typeof ParameterSpecSchema>;

/** The JSON Schema committed as schema/keel-spec.schema.json and printed by `keel schema`. */
export function buildSpecJsonSchema(): Record<string, unknown> {
  const schema = z.toJSONSchema(KeelSpecSchema, {
    target: "draft-2020-12",
    io: "input",
    // zod's exporter writes a fixed tuple as bare prefixItems, which admits [lo] and [lo, hi, x]:
    // state the length, so the published schema refuses what the validator refuses
    override: (ctx) => {
      const def = ctx.zodSchema._zod.def;
      if (def.type === "tuple" && !def.rest)
        Object.assign(ctx.jsonSchema, { minItems: def.items.length, maxItems: def.items.length });
    },
  }) as Record<string, unknown>;
  return { $id: "keel-spec.schema.json", title: "keel model spec", ...schema };
}
