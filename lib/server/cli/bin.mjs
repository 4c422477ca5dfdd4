#!/usr/bin/env node
// Launcher for the `epochal` command: loads TypeScript through tsx, then runs the dispatcher.
// Exits as soon as the command returns (stdout and stderr are synchronous for files and pipes
// on Linux), so that idle connection pools cannot hold a finished command open.
import { register } from "tsx/esm/api";

register();
const { main } = await import("./main.ts");
const code = await main(process.argv.slice(2));
process.exit(code);
