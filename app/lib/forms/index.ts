// Shared by routes (actions validate with these) and components (conform validates with the same schema).
export * from "./fields";
export * from "./reply";
export * from "./use-schema-form";
