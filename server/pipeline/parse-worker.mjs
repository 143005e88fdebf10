// Worker-thread entry: threads do not inherit the tsx loader, so register it before loading the TypeScript worker.
import { register } from "tsx/esm/api";

register();
await import(new URL("./parse-worker.ts", import.meta.url).href);
