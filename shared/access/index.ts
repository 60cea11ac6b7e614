/** Roles and permission rules shared by the server (which enforces them) and the app. */
export * from './roles'
export * from './rules'
export * from './refusals'
