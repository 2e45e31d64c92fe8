/** Control of the private services and processes behind `npm start` and `npm test`, reusable by tests. */
export { spawnChild, runCommand, describeExit, killAllChildrenNow, type ChildHandle, type ExitInfo, type SpawnChildOptions } from './child';
export { ensureDebianPackages, missingDebianPackages, MissingPackagesError } from './debian';
export { startMariaDb, runningMariaDbPid, type MariaDbHandle, type MariaDbOptions } from './mariadb';
export { AlreadyRunningError } from './server-process';
export { startRedis, runningRedisPid, type RedisHandle, type RedisOptions } from './redis';
export { startSmtpCatcher, type CaughtMail, type SmtpCatcherHandle, type SmtpCatcherOptions } from './smtp-catcher';
export { waitForHttp, waitUntil, isPortFree, assertPortsFree, WaitError, type WaitOptions } from './wait';
export { buildClientIfNeeded, clientInputsHash } from './client-build';
export { onStopSignals } from './signals';
