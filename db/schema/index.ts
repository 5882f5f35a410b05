export * from "./auth";
export * from "./homes";
export * from "./devices";
export * from "./library";
export * from "./zones";
export * from "./pushes";
export * from "./access";
export * from "./measurements";
