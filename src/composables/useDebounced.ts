import { ref, watch, type Ref, type WatchSource } from 'vue'

/** The source's value, updated only after it has stopped changing for `ms` (typing, spinning a number). */
export function useDebounced<T>(source: WatchSource<T>, initial: T, ms = 400): Ref<T> {
  const out = ref(initial) as Ref<T>
  let timer: ReturnType<typeof setTimeout> | undefined
  watch(
    source,
    (value) => {
      clearTimeout(timer)
      timer = setTimeout(() => (out.value = value), ms)
    },
    { deep: true, immediate: true },
  )
  return out
}
