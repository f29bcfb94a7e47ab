import { ref, type MaybeRefOrGetter, type Ref } from 'vue'
import { useForm, type FormContext } from 'vee-validate'
import { toTypedSchema } from '@vee-validate/zod'
import type { z } from 'zod'
import { useApiError } from './useApiError'
import { useFormFocus, type FocusTarget } from './useFormFocus'

/** What a successful submit leads to: a sentence in the form's "done" alert, or a place for focus. */
export type FormOutcome = string | { focus: MaybeRefOrGetter<FocusTarget> }

/** How a form built with `useApiForm` talks to its route. */
export interface ApiFormOptions<S extends z.ZodTypeAny, R> {
  /** The route's zod schema from shared/schemas (or the form's stricter version of it). */
  schema: S
  initialValues?: Partial<z.input<S>>
  /** Sends the checked values, normally one `$fetch`; a throw is read by the one error reader. */
  submit: (values: z.output<S>) => Promise<R>
  /**
   * Runs after a successful answer. It may return a `FormOutcome`: a sentence to show (and focus) as the outcome, or
   * `{ focus }`: where keyboard focus goes once the outcome is on screen. `form` is vee-validate's
   * (e.g. to `resetForm` with what the server saved).
   */
  onSuccess?: (result: R, values: z.output<S>, form: FormContext<z.input<S>>) => unknown
  /** Asks once more before sending (a destructive or far-reaching change); may depend on the values. */
  confirm?: boolean | ((values: z.output<S>) => boolean)
  /** Runs on every submit attempt, valid or not (e.g. to clear an outcome of the last try). */
  onAttempt?: () => void
}

/**
 * Every form that writes through an API route: vee-validate with the route's zod schema, one submit
 * at a time (`busy`), the server's 400 field messages beside their fields and its 422 reasons in the
 * form's alert (in words), focus on the first invalid field or else the alert, and an optional
 * "are you sure?" step (`confirming`; the next submit sends, `cancelConfirm()` goes back).
 * Bind `errorAlert`/`doneAlert` to the form's two FormAlerts and `confirmButton` to the "yes" button.
 */
export function useApiForm<S extends z.ZodTypeAny, R = unknown>(options: ApiFormOptions<S, R>) {
  const form = useForm({
    validationSchema: toTypedSchema(options.schema),
    initialValues: options.initialValues as never,
  })
  const apiError = useApiError()
  const done = ref<string | null>(null)
  const confirming = ref(false)
  const errorAlert = ref<FocusTarget>()
  const doneAlert = ref<FocusTarget>()
  const confirmButton = ref<FocusTarget>()
  const focus = useFormFocus(form.isSubmitting, {
    onAttempt: () => {
      apiError.clear()
      done.value = null
      options.onAttempt?.()
    },
  })

  const wantsConfirm = (values: z.output<S>) =>
    typeof options.confirm === 'function' ? options.confirm(values) : !!options.confirm

  async function send(values: z.output<S>) {
    if (wantsConfirm(values) && !confirming.value) {
      confirming.value = true
      await focus.focusOn(confirmButton)
      return
    }
    try {
      const result = await options.submit(values)
      confirming.value = false
      const outcome = await options.onSuccess?.(result, values, form as unknown as FormContext<z.input<S>>)
      if (typeof outcome === 'string') {
        done.value = outcome
        await focus.focusOn(doneAlert)
      }
      else if (outcome && typeof outcome === 'object' && 'focus' in outcome) await focus.focusOn((outcome as Exclude<FormOutcome, string>).focus)
    }
    catch (error) {
      confirming.value = false
      apiError.handle(error, form.setErrors as (fields: Record<string, string>) => void)
      await focus.afterError(errorAlert)
    }
  }

  const onSubmit = focus.guard(form.handleSubmit(values => send(values as z.output<S>), focus.onInvalid))

  /** Leaves the "are you sure?" step without sending; focus goes to `back` when given. */
  async function cancelConfirm(back?: Ref<FocusTarget> | (() => FocusTarget)) {
    confirming.value = false
    if (back) await focus.focusOn(back)
  }

  return {
    ...form,
    onSubmit,
    busy: form.isSubmitting,
    error: apiError.message,
    clearError: apiError.clear,
    done,
    confirming,
    cancelConfirm,
    errorAlert,
    doneAlert,
    confirmButton,
    focus,
  }
}
