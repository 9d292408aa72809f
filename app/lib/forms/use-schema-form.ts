import { useForm, type FieldMetadata } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import type { z } from "zod";
import type { FormReply } from "./reply";

/**
 * conform's form state for a schema the action validates too: with scripts the same messages appear on leaving a
 * field and keep up while it is corrected; without them the action's reply (`lastResult`) fills the same places.
 */
export function useSchemaForm<S extends z.ZodObject>(
  schema: S,
  lastResult: FormReply | null | undefined,
  options: { id?: string; defaultValue?: Partial<z.input<S>> } = {},
) {
  return useForm<z.input<S>, z.output<S>>({
    id: options.id,
    lastResult,
    defaultValue: options.defaultValue as never,
    onValidate: ({ formData }) => parseWithZod(formData, { schema }),
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
  });
}

/** What `Field`, `SelectField` and `TimezoneSelect` take from a conform field: its name, value to refill, message. */
export function fieldProps(field: FieldMetadata<unknown>) {
  const value = field.initialValue;
  return { name: field.name, defaultValue: typeof value === "string" ? value : undefined, error: field.errors?.[0] };
}
