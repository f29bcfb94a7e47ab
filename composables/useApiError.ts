import { ref } from 'vue'
import { readApiError, type ApiErrorText } from '~~/shared/utils/api-error'

/**
 * The screen side of the one error reader (`readApiError` in shared/utils/api-error.ts): holds the
 * message a form or action shows, and hands 400 field messages to vee-validate's `setErrors` so
 * they land beside the fields. `handle` returns what it read (codes included, for logic only).
 */
export function useApiError() {
  const message = ref<string | null>(null)
  function handle(error: unknown, setErrors?: (fields: Record<string, string>) => void): ApiErrorText {
    const read = readApiError(error)
    if (setErrors && Object.keys(read.fields).length) setErrors(read.fields)
    message.value = read.message
    return read
  }
  function clear() {
    message.value = null
  }
  return { message, handle, clear }
}
