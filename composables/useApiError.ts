import type { FetchError } from 'ofetch'
import type { RefusalBody } from '~~/shared/types/common'

/** An error body from our routes: 400 carries `data.fields`, 422 carries `data.reasons`. */
interface ApiErrorData { message?: string, data?: { fields?: Record<string, string> } & Partial<RefusalBody> }

/**
 * Turns a failed $fetch into what a form shows: a message, field errors (400) and refusal
 * reasons (422). `setErrors` is vee-validate's, so server field messages land beside the fields.
 */
export function useApiError() {
  const message = ref<string | null>(null)
  function handle(error: unknown, setErrors?: (fields: Record<string, string>) => void) {
    const body = (error as FetchError<ApiErrorData>)?.data
    const fields = body?.data?.fields
    if (fields && setErrors) setErrors(fields)
    const reasons = body?.data?.reasons
    message.value = reasons?.length
      ? reasons.map(r => r.message).join(' ')
      : body?.message ?? (error as Error)?.message ?? 'Something went wrong. Try again.'
  }
  function clear() {
    message.value = null
  }
  return { message, handle, clear }
}
