import { z } from "zod";

/** Fields and schemas shared by actions and their forms (conform validates with the same schemas; see `reply.ts`). */

export const isTimeZone = (tz: string) => {
  try {
    new Intl.DateTimeFormat("en", { timeZone: tz });
    return true;
  } catch {
    return false;
  }
};

export const emailField = z
  .string({ error: "Enter an e-mail address." })
  .trim()
  .toLowerCase()
  .min(1, "Enter an e-mail address.")
  .max(320, "That address is too long.")
  .email("Enter a valid e-mail address, like name@example.com.");

export const newPasswordField = z
  .string({ error: "Choose a password." })
  .min(10, "Use at least 10 characters for your password.")
  .max(200, "Use at most 200 characters for your password.");

export const nameField = z
  .string({ error: "Enter a name." })
  .trim()
  .min(1, "Enter a name.")
  .max(120, "Use at most 120 characters.")
  // eslint-disable-next-line no-control-regex -- finding control characters is the point of this check
  .refine((v) => !/[\u0000-\u001f]/.test(v), "A name cannot contain line breaks or control characters.");

export const timezoneField = z
  .string()
  .trim()
  .default("UTC")
  .refine(isTimeZone, "Choose a time zone from the list, like Europe/Berlin.");

export const signUpSchema = z.object({
  name: nameField,
  email: emailField,
  password: newPasswordField,
  role: z.enum(["coach", "athlete"], { error: "Choose whether you coach or train." }),
  timezone: timezoneField,
});

export const forgotSchema = z.object({ email: emailField });

/** Only presence is checked here: whether the pair matches an account is the sign-in's question, asked once. */
export const signInSchema = z.object({
  email: z.string({ error: "Enter your e-mail address." }).trim().min(1, "Enter your e-mail address."),
  password: z.string({ error: "Enter your password." }).min(1, "Enter your password."),
  redirectTo: z.string().optional(),
});

export const twoStepSchema = z.object({
  code: z
    .string({ error: "Enter the code from your app, or a recovery code." })
    .trim()
    .min(1, "Enter the code from your app, or a recovery code."),
});

export const resetSchema = z
  .object({ password: newPasswordField, confirm: z.string({ error: "Type the new password again." }) })
  .refine((v) => v.password === v.confirm, { message: "The two passwords differ.", path: ["confirm"] });

export const inviteSchema = z.object({
  email: emailField,
  name: z.string().trim().max(120, "Use at most 120 characters.").optional().default(""),
});

export const acceptInviteSchema = z.object({
  name: nameField,
  password: newPasswordField,
  timezone: timezoneField,
});

export const roleChangeSchema = z.object({
  userId: z.coerce.number().int().positive(),
  role: z.enum(["admin", "coach", "athlete"], { error: "Choose a role." }),
});

const optionalNumber = (min: number, max: number, label: string) =>
  z
    .string()
    .trim()
    .optional()
    .transform((v) => (v ? Number(v.replace(",", ".")) : null))
    .refine(
      (v) => v === null || (Number.isFinite(v) && v >= min && v <= max),
      `${label} must be between ${min} and ${max}.`,
    );

/** What a coach records about an athlete's body: heart-rate load and power-to-weight need it. */
export const athleteProfileSchema = z
  .object({
    sex: z
      .enum(["", "female", "male"])
      .optional()
      .transform((v) => (v ? v : null)),
    weightKg: optionalNumber(25, 250, "Weight (kg)"),
    restingHr: optionalNumber(25, 120, "Resting heart rate"),
    maxHr: optionalNumber(100, 230, "Maximum heart rate"),
  })
  .refine((v) => v.restingHr === null || v.maxHr === null || v.maxHr > v.restingHr + 20, {
    message: "Maximum heart rate must be well above resting heart rate.",
    path: ["maxHr"],
  });
