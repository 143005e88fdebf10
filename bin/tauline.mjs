#!/usr/bin/env node
// Runs the TypeScript command line through tsx, so the CLI shares shared/ code with the server unbuilt.
import { register } from "tsx/esm/api";

register();
await import(new URL("../cli/tauline.ts", import.meta.url).href);
