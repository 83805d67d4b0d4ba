export * from "./auth";
export * from "./workspaces";
export * from "./parts";
export * from "./plates";
export * from "./accounts";
export * from "./floor";
export * from "./billing";
