#!/usr/bin/env node
// Launcher for the TypeScript command line: registers tsx's loader, then runs cli/main.ts.
import { register } from "tsx/esm/api";

register();
const { main } = await import("../cli/main.ts");
process.exitCode = await main(process.argv.slice(2));
