/** How the report names this program; the statistics engine's version is added from the result. */
export const SOFTWARE_NAME = 'Nestwise'
