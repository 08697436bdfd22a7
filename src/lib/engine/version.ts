/** The engine's version, recorded in every run (bump on any change of numerical behaviour). */
export const ENGINE_VERSION = 'lakeledger-engine 0.1.0';
