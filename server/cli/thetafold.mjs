#!/usr/bin/env node
// Entry of `npx thetafold`: registers tsx for TypeScript (with this project's tsconfig paths, wherever
// it is started from) and runs server/cli/main.ts.
import { register } from "tsx/esm/api";

register({ tsconfig: new URL("../../tsconfig.json", import.meta.url).pathname });
const { main } = await import("./main.ts");
process.exitCode = await main(process.argv.slice(2));
