// Entry of the analysis thread: TypeScript through tsx's loader (the app and the worker run under tsx too).
import { register } from "tsx/esm/api";

register();
await import("./analysis-thread-main.ts");
