/**
 * Version of the engine's output. Bump it whenever a change can alter any analysis of any program (a fix, a new
 * rule, a new field, a changed default): stored analyses carry the number they were made with, and the program
 * vault analyses stored revisions again when it differs. 1 was the analysis format before this constant existed.
 */
export const ENGINE_VERSION = 2;
