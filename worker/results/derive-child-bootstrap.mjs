// Entry of the derivation child process. It starts without the worker's Node options (so the same code
// works under `node --import tsx` and inside the test runner): it registers tsx's ESM loader itself and
// then loads the TypeScript module that does the work.
import { register } from "tsx/esm/api";

register();
await import("./derive-child.ts");
