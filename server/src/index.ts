import { createEdgecaseServer } from './app';
import { logger } from './lib/logger';

process.env.EDGECASE_PROCESS ??= 'web';

/** Entry point of the web server (API + built client + Socket.IO). */
async function main() {
  const server = createEdgecaseServer();
  const port = await server.listen();
  logger().info({ port, host: server.config.HOST, mode: server.config.EDGECASE_MODE }, 'web server listening');

  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    logger().info({ signal }, 'web server stopping');
    const force = setTimeout(() => process.exit(1), 10_000);
    force.unref();
    await server.close().catch((err) => logger().error({ err }, 'error while stopping'));
    process.exit(0);
  };
  process.on('SIGTERM', () => void stop('SIGTERM'));
  process.on('SIGINT', () => void stop('SIGINT'));
}

process.on('unhandledRejection', (reason) => {
  logger().error({ err: reason }, 'unhandled promise rejection');
});
process.on('uncaughtException', (err) => {
  logger().fatal({ err }, 'uncaught exception; exiting');
  process.exit(1);
});

main().catch((err) => {
  logger().fatal({ err }, 'web server failed to start');
  process.exit(1);
});
