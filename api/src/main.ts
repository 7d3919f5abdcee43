import { Logger } from '@nestjs/common';
import { createApp } from './app.js';
import { readApiConfig } from './config/api-config.js';

async function main(): Promise<void> {
  const config = readApiConfig();
  const app = await createApp({ config });
  await app.listen({ port: config.port, host: config.host });
  new Logger('api').log(`listening on http://${config.host}:${config.port}/api (docs: /api/docs)`);
}

main().catch((error: unknown) => {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
});
