/** Types of scripts/results-schema.mjs, for the test that compares its output with the committed schema. */
export declare const RESULTS_SCHEMA_PATH: string;
/** The JSON Schema of results.json, generated from ResultsDocument. */
export declare function generateResultsSchema(): Record<string, unknown>;
/** The schema as the committed file holds it: two-space JSON and a final newline. */
export declare function resultsSchemaText(): string;
