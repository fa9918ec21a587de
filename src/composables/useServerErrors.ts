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
