import 'server-only';
import { getSql } from '@/db/client';
import { logger } from './logger';
import { checkMail } from './mail';
import { checkStorage } from './storage';

export type ServiceName = 'database' | 'storage' | 'mail';
export interface ServiceState {
  ok: boolean;
  latencyMs: number;
  error?: string;
}
export interface HealthReport {
  ok: boolean;
  services: Record<ServiceName, ServiceState>;
  down: ServiceName[];
}

const CHECK_TIMEOUT_MS = 3000;

function withTimeout<T>(what: string, promise: Promise<T>): Promise<T> {
  return Promise.race([
    promise,
    new Promise<never>((_, reject) =>
      setTimeout(
        () => reject(new Error(`${what} did not answer within ${CHECK_TIMEOUT_MS} ms`)),
        CHECK_TIMEOUT_MS,
      ).unref(),
    ),
  ]);
}

async function probe(name: ServiceName, check: () => Promise<unknown>): Promise<ServiceState> {
  const started = performance.now();
  try {
    await withTimeout(name, check());
    return { ok: true, latencyMs: Math.round(performance.now() - started) };
  } catch (err) {
    logger.warn({ service: name, err: err instanceof Error ? err.message : String(err) }, 'health check failed');
    // Say which service is down, not its connection string or stack.
    return { ok: false, latencyMs: Math.round(performance.now() - started), error: `${name} unreachable` };
  }
}

/** Checks the three services in parallel; each within a few seconds. */
export async function checkHealth(): Promise<HealthReport> {
  const [database, storage, mail] = await Promise.all([
    probe('database', () => getSql()`select 1`),
    probe('storage', checkStorage),
    probe('mail', checkMail),
  ]);
  const services = { database, storage, mail };
  const down = (Object.keys(services) as ServiceName[]).filter((k) => !services[k].ok);
  return { ok: down.length === 0, services, down };
}
