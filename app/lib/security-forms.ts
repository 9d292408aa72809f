import { z } from "zod";

/**
 * The forms of the sign-in and devices page (`account/security`), shared by its action and its component: each
 * intent has its schema, so the browser and the action refuse with the same words beside the same field.
 */

const codeField = z
  .string({ error: "Enter the six-digit code your app shows." })
  .trim()
  .min(1, "Enter the six-digit code your app shows.");

/** Confirms the enrolment with the app's code; the reply then carries the recovery codes, this once. */
export const confirmTwoStepSchema = z.object({ code: codeField });

/** Turning two-step sign-in off asks for a current code, so a borrowed signed-in browser cannot do it. */
export const disableTwoStepSchema = z.object({ code: codeField });

/** Starts the enrolment: nothing to fill in, the button is the whole form. */
export const startTwoStepSchema = z.object({});

/** One signed-in device, named by the handle the loader gave it (never the session key itself). */
export const signOutDeviceSchema = z.object({
  handle: z.string({ error: "Choose a device." }).trim().min(1, "Choose a device."),
});

export const signOutOthersSchema = z.object({});

/** An unticked checkbox sends nothing, which conform reads as missing: that is "optional". */
export const studioTwoStepSchema = z.object({ required: z.boolean().optional().default(false) });

/** Said above a form the action refused before changing anything. */
export const NOTHING_CHANGED = "Nothing was changed: check the marked field.";
