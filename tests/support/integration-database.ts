/** Integration runs name their database with this prefix and the run's process id. */
export const INTEGRATION_DB_PREFIX = 'nestwise_test_'
