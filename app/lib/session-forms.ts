import { z } from "zod";

// Forms of the session pages (the athlete's and the coach's view of one scheduled session): the actions validate
// with these, and the components validate with the same schemas in the browser.

export const completeSchema = z
  .object({
    status: z.enum(["done", "skipped", "planned"], { error: "Choose done or skipped." }),
    effortScore: z.coerce.number().int().min(0).max(10).optional(),
    minutes: z.coerce
      .number()
      .min(1, "Minutes must be at least 1.")
      .max(1440, "Minutes must be at most 1440.")
      .optional(),
    comment: z.string().max(1000).default(""),
  })
  .refine((v) => v.status !== "done" || v.effortScore !== undefined, {
    message: "Choose how hard it felt (0–10).",
    path: ["effortScore"],
  });

export const commentSchema = z.object({
  body: z
    .string({ error: "Write something first." })
    .trim()
    .min(1, "Write something first.")
    .max(2000, "Keep a comment under 2000 characters."),
});
