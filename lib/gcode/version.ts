/**
 * Version of the analysis engine's results. Bump it whenever a change alters what analyzeProgram reports for the
 * same bytes and options: stored analyses made by an older version are then re-analysed in the background.
 */
export const ENGINE_VERSION = 1;
