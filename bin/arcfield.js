#!/usr/bin/env node
// The `arcfield` command (office CLI and sync server). Runs the TypeScript sources through tsx,
// so the CLI, the server and the app share one engine with no separate build step.
import { register } from 'tsx/esm/api';

register();
const { main } = await import('../src/cli/main.ts');
process.exitCode = await main(process.argv.slice(2));
