export * from './auth'
export * from './labs'
export * from './users'
