import { ref } from 'vue'
import { defineStore } from 'pinia'

/**
 * Whether the last change someone made was lost to a database outage (the server's 503
 * `unavailable`). Client state only: set and cleared by the query client's mutation cache.
 */
export const useOutageStore = defineStore('outage', () => {
  const unsavedAt = ref<Date | null>(null)
  function writeFailed(): void {
    unsavedAt.value = new Date()
  }
  function clear(): void {
    unsavedAt.value = null
  }
  return { unsavedAt, writeFailed, clear }
})
