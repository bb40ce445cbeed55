/** keel's version; a test holds it equal to package.json's. */
export const KEEL_VERSION = "0.1.0";

/**
 * Version of the results.json format (its key `format`): raised whenever a key of results.json is
 * renamed, moved or removed, or changes meaning, so a reader can tell which shape it holds.
 * schema/keel-results.schema.json (npm run schema:results) describes the current one.
 */
export const RESULTS_FORMAT = 2;
