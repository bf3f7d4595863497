export * from "./enums";
export * from "./accounts";
export * from "./datasets";
export * from "./trials";
export * from "./review";
export * from "./operations";
