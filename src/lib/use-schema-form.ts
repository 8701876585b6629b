import { useCallback, useState } from "react";
import type { z } from "zod";
import { ApiError } from "./api-client";

export type FieldErrors = Partial<Record<string, string>>;

/** Field values of a form as strings, keyed by input name (FormData; files are not read here). */
function readForm(form: HTMLFormElement): Record<string, string> {
  const values: Record<string, string> = {};
  for (const [name, value] of new FormData(form)) if (typeof value === "string") values[name] = value;
  return values;
}

function focusField(form: HTMLFormElement | null, name: string | undefined): void {
  if (!form || !name) return;
  const element = form.elements.namedItem(name);
  if (element instanceof HTMLElement) element.focus();
}

/**
 * An extra check for parse(): the "confirmPassword" field must repeat the named password field.
 * @param field name of the password input ("password" or "newPassword")
 */
export function confirmMatches(field: string): (values: Record<string, string>) => FieldErrors {
  return (values) => (values[field] === values.confirmPassword ? {} : { confirmPassword: "The two passwords differ" });
}

/**
 * Validates a form with the same Zod schema the server uses, and keeps the messages to show:
 * one per field (first issue wins) plus one for the whole form (a server answer not tied to a field).
 */
export function useSchemaForm<S extends z.ZodType>(schema: S) {
  const [fieldErrors, setFieldErrors] = useState<FieldErrors>({});
  const [formError, setFormError] = useState<string | null>(null);

  /** Parses the form; on failure shows the field errors, focuses the first bad field and returns null. */
  const parse = useCallback(
    (form: HTMLFormElement, extraChecks?: (values: Record<string, string>) => FieldErrors): z.infer<S> | null => {
      const values = readForm(form);
      const result = schema.safeParse(values);
      const errors: FieldErrors = {};
      if (!result.success) {
        for (const issue of result.error.issues) {
          const key = String(issue.path[0] ?? "");
          if (key && errors[key] === undefined) errors[key] = issue.message;
        }
      }
      Object.assign(errors, Object.fromEntries(Object.entries(extraChecks?.(values) ?? {}).filter(([k]) => errors[k] === undefined)));
      setFieldErrors(errors);
      setFormError(null);
      const firstBad = Array.from(form.elements).find(
        (element) => element instanceof HTMLElement && "name" in element && errors[(element as HTMLInputElement).name],
      ) as HTMLInputElement | undefined;
      if (firstBad) {
        focusField(form, firstBad.name);
        return null;
      }
      return result.success ? (result.data as z.infer<S>) : null;
    },
    [schema],
  );

  /** Shows a failed submit: details with a path go beside their field, the message above the form. */
  const showServerError = useCallback((error: unknown) => {
    if (error instanceof ApiError) {
      const errors: FieldErrors = {};
      for (const detail of error.details) {
        const key = detail.path?.split(".")[0];
        if (key && errors[key] === undefined) errors[key] = detail.message;
      }
      setFieldErrors(errors);
      setFormError(error.message);
      return;
    }
    setFormError(error instanceof Error ? error.message : "Something went wrong. Try again.");
  }, []);

  const clear = useCallback(() => {
    setFieldErrors({});
    setFormError(null);
  }, []);

  return { fieldErrors, formError, parse, showServerError, clear };
}
