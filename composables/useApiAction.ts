import { ref, type MaybeRefOrGetter } from 'vue'
import { useApiError } from './useApiError'
import { useFormFocus, type FocusTarget } from './useFormFocus'

/** How an action built with `useApiAction` runs. `A` is what a click passes (a row's id …). */
export interface ApiActionOptions<A, R> {
  /** The call, normally one `$fetch`; a throw is read by the one error reader. */
  run: (arg: A) => Promise<R>
  /** The sentence shown (and focused) once it went through; null shows nothing. */
  done?: (result: R, arg: A) => string | null
  /** Reloads what the action changed (a useFetch `refresh`), after success. */
  refresh?: () => Promise<unknown>
  /** Whether `execute` first asks "are you sure?" (`confirming` holds the argument until `execute` again). */
  confirm?: boolean
}

/**
 * A button that calls the API outside a form: one call at a time (`busy`, and `busyWith` for the
 * row it is about), an optional "are you sure?" step, the outcome or the error in words, focus on
 * that outcome (bind `doneAlert`/`errorAlert` to two FormAlerts), and a refresh after.
 */
export function useApiAction<A = void, R = unknown>(options: ApiActionOptions<A, R>) {
  const busy = ref(false)
  const busyWith = ref<A | null>(null)
  const confirming = ref<{ arg: A } | null>(null)
  const done = ref<string | null>(null)
  const apiError = useApiError()
  const errorAlert = ref<FocusTarget>()
  const doneAlert = ref<FocusTarget>()
  const focus = useFormFocus(busy)

  /** Opens the "are you sure?" step for `arg`; focus goes to `yes` (the confirming button) when given. */
  async function ask(arg: A, yes?: MaybeRefOrGetter<FocusTarget>) {
    confirming.value = { arg }
    if (yes) await focus.focusOn(yes)
  }
  /** Closes the "are you sure?" step; focus goes back to `to` when given. */
  async function cancel(to?: MaybeRefOrGetter<FocusTarget>) {
    confirming.value = null
    if (to) await focus.focusOn(to)
  }

  /** Runs the action (or, when it asks first and has not asked yet, opens the question). */
  async function execute(arg: A): Promise<R | undefined> {
    if (busy.value) return undefined
    if (options.confirm && !confirming.value) {
      await ask(arg)
      return undefined
    }
    busy.value = true
    busyWith.value = arg
    done.value = null
    apiError.clear()
    let result: R | undefined
    try {
      result = await options.run(arg)
      done.value = options.done?.(result, arg) ?? null
      await options.refresh?.()
    }
    catch (error) {
      apiError.handle(error)
    }
    finally {
      busy.value = false
      busyWith.value = null
      confirming.value = null
    }
    if (done.value) await focus.focusOn(doneAlert)
    else if (apiError.message.value) await focus.focusOn(errorAlert)
    return result
  }

  return { busy, busyWith, confirming, done, error: apiError.message, execute, ask, cancel, doneAlert, errorAlert }
}
