import type { TypedSchema } from 'vee-validate'

/**
 * A vee-validate schema whose validator (yup and the schema module, about 12 kB gzip) downloads
 * at the first check instead of with the page. For the sign-in form, the first screen anyone
 * sees; the rules are still the one shared yup schema the server checks.
 */
export function lazyTypedSchema<TInput, TOutput>(load: () => Promise<TypedSchema<TInput, TOutput>>): TypedSchema<TInput, TOutput> {
  let loading: Promise<TypedSchema<TInput, TOutput>> | null = null
  const schema = () =>
    (loading ??= load().catch((error: unknown) => {
      loading = null // a failed download is tried again at the next check
      throw error
    }))
  return {
    __type: 'VVTypedSchema',
    parse: async (values, context) => (await schema()).parse(values, context),
  }
}
