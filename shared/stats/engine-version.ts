/**
 * Version of the statistics engine, written into every result so a stored analysis says which
 * engine produced it. Bump it when a change can move any reported number or adds a kind of result
 * (0.2: the maximal nested model, two factors, covariates; 0.3: binary and count responses; 0.3.1:
 * a binary or count variance that stalled just above 0 is now at its boundary 0, with its SEs).
 */
export const ENGINE_VERSION = '0.3.1'
