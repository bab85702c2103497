export * from "./auth";
export * from "./workshop";
export * from "./events";
export * from "./mail";
export * from "./genealogy";
export * from "./veneer";
export * from "./uploads";
export * from "./lab";
