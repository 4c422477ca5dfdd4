#!/usr/bin/env node
// Launcher for the `epochal` command: loads TypeScript through tsx, then runs the dispatcher.
import { register } from "tsx/esm/api";

register();
const { main } = await import("./main.ts");
const code = await main(process.argv.slice(2));
process.exitCode = code;
