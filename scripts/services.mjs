/**
 * `npm run services -- start|stop|status`: the development services on their fixed local ports
 * (see .env.example), data under .data/. `npm start` calls the same code.
 */
import path from 'node:path';
import { devPorts } from './lib/dev-config.mjs';
import { startAll, stopAll } from './lib/services.mjs';

const dataDir = path.resolve(import.meta.dirname, '..', '.data');
const command = process.argv[2] ?? 'status';

if (command === 'start') {
  const { env } = await startAll({ dataDir, ports: devPorts });
  for (const [k, v] of Object.entries(env)) console.log(`${k}=${v}`);
} else if (command === 'stop') {
  await stopAll({ dataDir });
} else {
  console.error('usage: npm run services -- start|stop');
  process.exit(3);
}
