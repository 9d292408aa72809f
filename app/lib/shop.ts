export const CURRENCIES = ["EUR", "USD", "GBP"] as const;
export const LEVELS = ["beginner", "intermediate", "advanced"] as const;
