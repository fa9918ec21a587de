import { computed, watch } from 'vue'
import type { Ref } from 'vue'
import { isApiError } from '@/api/client'

/**
 * Puts a failed mutation's per-field messages on the form's fields, and returns the
 * message to show above the form when the failure is not about one field.
 */
export function useServerErrors(
  error: Ref<unknown>,
  setErrors: (fields: Record<string, string>) => void,
  messages: Record<string, string> = {},
) {
  watch(error, (e) => {
    if (isApiError(e) && Object.keys(e.fields).length > 0) setErrors(e.fields)
  })

  return computed<string | null>(() => {
    const e = error.value
    if (!e) return null
    if (!isApiError(e)) return 'Something went wrong. Try again.'
    if (Object.keys(e.fields).length > 0) return null
    return messages[e.code] ?? e.message
  })
}

/**
 * Some server rules answer with a bare fragment for the field ("must not be before the date of
 * birth"); put the field's label in front so the message reads on its own under the field.
 */
export function withFieldLabels(setErrors: (fields: Record<string, string>) => void, labels: Record<string, string>) {
  return (fields: Record<string, string>) =>
    setErrors(
      Object.fromEntries(
        Object.entries(fields).map(([k, msg]) => [k, /^[a-z]/.test(msg) && labels[k] && !msg.startsWith(k) ? `${labels[k]} ${msg}` : msg]),
      ),
    )
}
