import 'server-only';
import { drizzle, type PostgresJsDatabase } from 'drizzle-orm/postgres-js';
import postgres from 'postgres';
import { env } from '@/src/server/env';
import * as schema from './schema';

export type Database = PostgresJsDatabase<typeof schema>;

interface Connection {
  sql: postgres.Sql;
  db: Database;
}

// One pool per process. Kept on globalThis so that Next's dev-mode module reloading does not
// open a new pool on every edit.
const globalForDb = globalThis as unknown as { varigateDb?: Connection };

function connect(): Connection {
  const sql = postgres(env().DATABASE_URL, {
    max: env().DATABASE_POOL_SIZE,
    onnotice: () => {},
    connect_timeout: 5,
  });
  return { sql, db: drizzle(sql, { schema }) };
}

function connection(): Connection {
  globalForDb.varigateDb ??= connect();
  return globalForDb.varigateDb;
}

/** The drizzle database. Only src/server/queries/* and services should import it. */
export function getDb(): Database {
  return connection().db;
}

/** The raw postgres.js client, for health checks and the queue. */
export function getSql(): postgres.Sql {
  return connection().sql;
}

export async function closeDb(): Promise<void> {
  const c = globalForDb.varigateDb;
  globalForDb.varigateDb = undefined;
  if (c) await c.sql.end({ timeout: 5 });
}

/** Anything that can run drizzle queries: the database or an open transaction. */
export type Executor = Pick<Database, 'select' | 'insert' | 'update' | 'delete' | 'execute'>;

/** Runs `fn` in one transaction. */
export function transaction<T>(fn: (tx: Executor) => Promise<T>): Promise<T> {
  return getDb().transaction((tx) => fn(tx));
}
