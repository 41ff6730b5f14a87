import type { Logger } from 'pino';

/**
 * Last-resort handlers for the API and worker processes. A promise nobody caught is a bug, but
 * one stray rejection must not take every depot's API down: it is logged loudly (error level,
 * with its stack) and the process serves on. A thrown exception that reached the event loop
 * leaves the process in an unknown state, so that one is logged and the process exits non-zero
 * for the supervisor (systemd, the container runtime) to restart it.
 */
export function installProcessGuards(log: Logger, exit: (code: number) => void = (code) => process.exit(code)): void {
  process.on('unhandledRejection', (reason) => {
    log.error({ err: reason }, 'unhandled promise rejection: this is a bug, the process carries on');
  });
  process.on('uncaughtException', (err, origin) => {
    log.fatal({ err, origin }, 'uncaught exception: stopping the process');
    exit(1);
  });
}
