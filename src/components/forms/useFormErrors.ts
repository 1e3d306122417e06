import { reactive, ref } from 'vue';
import { ApiError } from '../../api/http';

/**
 * Errors for one form: per-field messages (shown under the field through NFormItem's feedback) and
 * one form-level message for what belongs to no field. Server errors are mapped by ApiError.field,
 * which may be a dotted path ("limits.wallTimeMs"): the last segment that names a field wins.
 */
export function useFormErrors<K extends string>(fields: readonly K[]) {
  const field = reactive({}) as Partial<Record<K, string>>;
  const form = ref<string | null>(null);

  function clear() {
    for (const k of fields) field[k] = undefined;
    form.value = null;
  }

  function set(k: K, message: string) {
    field[k] = message;
  }

  function match(name: string | undefined): K | undefined {
    if (!name) return undefined;
    if ((fields as readonly string[]).includes(name)) return name as K;
    const parts = name.split(/[.[\]]/).filter(Boolean);
    for (let i = parts.length - 1; i >= 0; i--) {
      if ((fields as readonly string[]).includes(parts[i])) return parts[i] as K;
    }
    return undefined;
  }

  /** Put an error from the server (or anything thrown) where it belongs. */
  function take(e: unknown, fallback?: K) {
    if (e instanceof ApiError) {
      const k = match(e.field);
      if (k) field[k] = e.message;
      else if (fallback) field[fallback] = e.message;
      else form.value = e.message;
    } else {
      form.value = e instanceof Error ? e.message : 'Something went wrong. Try again.';
    }
  }

  /** Props for NFormItem: `v-bind="errors.item('email')"`. */
  function item(k: K) {
    const msg = field[k];
    return msg ? { validationStatus: 'error' as const, feedback: msg } : { validationStatus: undefined, feedback: undefined };
  }

  const any = () => form.value !== null || fields.some((k) => field[k]);

  return { field, form, clear, set, take, item, any };
}

export type FormErrors<K extends string> = ReturnType<typeof useFormErrors<K>>;

export const EMAIL_RE = /^[^\s@]+@[^\s@]+\.[^\s@]+$/;
