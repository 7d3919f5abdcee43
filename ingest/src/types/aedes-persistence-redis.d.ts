// aedes-persistence-redis ships no type declarations. Its main entry wraps the persistence in
// the callback interface of aedes 0.x; aedes 1.x wants the promise-based class below (it checks
// that `setup` is an async function), which the package keeps in its own file.
declare module 'aedes-persistence-redis/asyncPersistence.js' {
  /** The ioredis connection options used here, plus the persistence's own. */
  interface AsyncRedisPersistenceOptions {
    host?: string;
    port?: number;
    username?: string;
    password?: string;
    db?: number;
    tls?: object;
    maxRetriesPerRequest?: number | null;
    /** A connection made by the caller (an ioredis client); the options above are then unused. */
    conn?: unknown;
    /** Most queued messages delivered to a persistent session when it reconnects. */
    maxSessionDelivery?: number;
  }

  class AsyncRedisPersistence {
    constructor(options?: AsyncRedisPersistenceOptions);
    setup(broker: unknown): Promise<void>;
    /** The retained messages matching any of the patterns (an async generator). */
    createRetainedStreamCombi(patterns: string[]): AsyncIterable<unknown>;
    destroy(): Promise<void>;
  }

  export = AsyncRedisPersistence;
}
