/**
 * Version of the analysis engine. Bump it whenever any number a report carries can change
 * (a method, a default, a tolerance), so every verdict can be traced to the engine that made it.
 */
export const ENGINE_VERSION = '1.0.0';
