export const ROLES = ["admin", "coach", "athlete"] as const;
export type Role = (typeof ROLES)[number];
