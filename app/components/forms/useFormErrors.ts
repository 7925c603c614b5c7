// Per-field and form-level messages for one form, from the client's zod check or the server's 400 answer.
// Both sides use the same schemas (shared/auth.ts) and the same shape ({ field: [messages] }), so a form
// shows a server message exactly where it would have shown the client's.
import { reactive, ref } from 'vue';
import type { z } from 'zod';
import { fieldErrors } from '@shared/auth';
import { ApiError } from '@app/api/client';

export interface FormErrors {
  /** Messages per field name; '_' holds messages about the whole form. */
  readonly fields: Record<string, string[]>;
  /** A message about the whole form (wrong password, rate limit, server unreachable). */
  readonly message: { value: string | null };
  /** Clears every message. */
  clear(): void;
  /** Parses values with the schema; on failure shows its messages and returns null. */
  check<S extends z.ZodType>(schema: S, values: unknown): z.output<S> | null;
  /** Shows what a failed request said: per-field messages beside their fields, the rest above the form. */
  show(error: unknown): void;
  /** The messages of one field joined for el-form-item's `error` prop ('' when none). */
  of(field: string): string;
}

export function useFormErrors(): FormErrors {
  const fields = reactive<Record<string, string[]>>({});
  const message = ref<string | null>(null);

  function clear(): void {
    for (const key of Object.keys(fields)) delete fields[key];
    message.value = null;
  }

  function setFields(next: Record<string, string[]>): void {
    for (const [key, messages] of Object.entries(next)) fields[key] = messages;
  }

  function check<S extends z.ZodType>(schema: S, values: unknown): z.output<S> | null {
    clear();
    const result = schema.safeParse(values);
    if (result.success) return result.data;
    setFields(fieldErrors(result.error));
    return null;
  }

  function show(error: unknown): void {
    clear();
    if (error instanceof ApiError) {
      setFields(error.fields);
      // A 400 with field messages needs no banner beyond them; anything else says what happened.
      const hasFieldMessages = Object.keys(error.fields).some((key) => key !== '_');
      message.value = hasFieldMessages ? null : error.message;
      return;
    }
    message.value = error instanceof TypeError ? 'Thence could not be reached. Check your connection and try again.' : 'Something went wrong. Please try again.';
  }

  function of(field: string): string {
    return (fields[field] ?? []).join(' ');
  }

  return { fields, message, clear, check, show, of };
}
