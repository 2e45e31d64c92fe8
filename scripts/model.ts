/** Entry point of `npm run model -- ...`; see scripts/model/cli.ts for the commands. */
import { runCli } from './model/cli';

process.exitCode = runCli(process.argv.slice(2));
