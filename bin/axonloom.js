#!/usr/bin/env node
// Entry point for the `axonloom` command. The engine is TypeScript; tsx's loader lets Node run it
// directly so there is no build step between editing a file and running a command.
import { register } from 'tsx/esm/api';
register();
const { main } = await import('../engine/cli/main.ts');
process.exitCode = await main(process.argv.slice(2));
