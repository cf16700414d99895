import { loadConfig } from './config/env';
import { createApp } from './app';
import { DEMO_ACCOUNTS } from './db/seed';
import { joinBaseUrl } from './common/network';

// The SQLite driver captures a stack trace for every query; mapping it through tsx's source maps
// costs more than the query itself under a burst of votes. Stack traces name the transpiled code.
if (process.env.CAIRN_SOURCE_MAPS !== 'true') process.setSourceMapsEnabled(false);

/** Starts Cairn: builds the app, listens on PORT, and shuts down cleanly on SIGINT/SIGTERM. */
async function main(): Promise<void> {
  const config = loadConfig();
  const cairn = await createApp(config);
  const { logger } = cairn.ctx;
  await new Promise<void>((resolve) => cairn.server.listen(config.port, config.host, resolve));
  const local = `http://localhost:${config.port}`;
  logger.info(`Cairn is running at ${local}`);
  // Its own line, so the address to put on the wall is easy to find.
  logger.info(`Phones join at ${joinBaseUrl(config)}`);
  if (config.seedDemo) logger.info(`demo facilitator: ${DEMO_ACCOUNTS.facilitator.email} / ${DEMO_ACCOUNTS.facilitator.password}`);
  if (cairn.ctx.mail.dev) logger.info(`dev inbox: ${local}/dev/inbox (local SMTP on 127.0.0.1:${cairn.ctx.mail.dev.port})`);

  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    logger.info(`${signal}: shutting down`);
    const force = setTimeout(() => process.exit(1), 10_000);
    force.unref();
    await cairn.close();
    process.exit(0);
  };
  process.on('SIGINT', () => void stop('SIGINT'));
  process.on('SIGTERM', () => void stop('SIGTERM'));
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
