/**
 * Version of the statistics engine, written into every result so a stored analysis says which
 * engine produced it. Bump it when a change can move any reported number.
 */
export const ENGINE_VERSION = '0.2.0'
