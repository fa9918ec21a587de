import { computed, watch, type Ref } from 'vue'
import { useForm, type FormState, type GenericObject, type TypedSchema } from 'vee-validate'
import { useServerErrors } from '@/composables/useServerErrors'

/** What the form needs of a TanStack mutation (`useMutation`'s answer fits it). */
interface DialogMutation<TInput> {
  mutate: (input: TInput, options: { onSuccess: () => void }) => void
  reset: () => void
  error: Readonly<Ref<unknown>>
  isPending: Readonly<Ref<boolean>>
}

/**
 * The form behind an admin "add or edit" dialog of a coded reference entry (a formulary product, an
 * operation): the add or the edit request by whether an entry is given, a fresh form each time the
 * dialog opens, and on submit either the whole entry or its changes without the code (the code names
 * the entry and is never changed).
 */
export function useAddOrEditForm<TEntry extends { code: string }, TValues extends GenericObject, TOutput extends GenericObject>(opts: {
  visible: Ref<boolean>
  entry: () => TEntry | null
  schema: (editing: boolean) => TypedSchema<TValues, TOutput>
  startValues: (entry: TEntry | null) => NoInfer<FormState<TValues>['values']>
  create: DialogMutation<TOutput>
  update: DialogMutation<{ code: string; changes: Omit<TOutput, 'code'> }>
}) {
  const { create, update } = opts
  const editing = computed(() => opts.entry() !== null)
  const mutation = computed(() => (editing.value ? update : create))
  const form = useForm({ validationSchema: computed(() => opts.schema(editing.value)) })
  const failure = useServerErrors(
    computed(() => mutation.value.error.value),
    // The server names fields by the schema's own keys; a generic TValues cannot say so to the checker.
    (fields) => form.setErrors(fields as Parameters<typeof form.setErrors>[0]),
  )

  watch(
    opts.visible,
    (open) => {
      if (!open) return
      create.reset()
      update.reset()
      // force: replace every value; the default merges into the last ones, so "Add" after "Edit"
      // would open holding the edited entry's figures.
      form.resetForm({ values: opts.startValues(opts.entry()) }, { force: true })
    },
    { immediate: true },
  )

  const onSubmit = form.handleSubmit((values) => {
    const done = { onSuccess: () => (opts.visible.value = false) }
    const entry = opts.entry()
    if (entry) {
      const { code: _code, ...changes } = values
      update.mutate({ code: entry.code, changes }, done)
    } else create.mutate(values, done)
  })
  const pending = computed(() => mutation.value.isPending.value)
  return { form, editing, failure, pending, onSubmit }
}
