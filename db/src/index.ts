export * from './schema.js';
export { createDb, createPool, type Database, type CreateDbOptions } from './database.js';
export { readDatabaseConfig, withDatabaseName, type DatabaseConfig } from './config.js';
export { migrateToLatest, migrateDown, migrateToNothing } from './migrate.js';
export { ensureDatabase, dropDatabase } from './admin.js';
export {
  PostgresCluster,
  ensurePostgresInstalled,
  findPostgresBin,
  type ClusterOptions,
  type ClusterState,
} from './cluster.js';
export { localCluster } from './local-cluster.js';
export { repoRoot, dataRoot } from './paths.js';
export {
  ensureTimePartitions,
  keptFrom,
  partitionEnd,
  partitionsOf,
  partitionedTables,
} from './partitions.js';
export { newGatewaySecret, hashGatewaySecret, verifyGatewaySecret } from './gateway-secrets.js';
export * from './mail/index.js';
export { startThrowawayCluster, freePort, type ThrowawayCluster } from './throwaway-cluster.js';
