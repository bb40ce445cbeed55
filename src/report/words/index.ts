/** All dossier wording, as functions: fates and types, outcomes and presence, deciding conditions, claims, methods, diagnostics. */
export * from "./fates.js";
export * from "./singularities.js";
export * from "./outcomes.js";
export * from "./presence.js";
export * from "./basins.js";
export * from "./conditions.js";
export * from "./claims.js";
export * from "./methods.js";
export * from "./diagnostics.js";
