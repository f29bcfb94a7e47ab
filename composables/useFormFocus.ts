import { nextTick, toValue, type ComponentPublicInstance, type MaybeRefOrGetter, type Ref } from 'vue'

/** Something focus can move to: an element, a component (its root element or its own `focus()`), or nothing. */
export type FocusTarget = HTMLElement | ComponentPublicInstance | null | undefined

/** Moves keyboard focus to `target` (an element, or a component's `focus()` or root element); false when there is none. */
export function focusTarget(target: FocusTarget): boolean {
  if (!target) return false
  if (target instanceof HTMLElement) {
    target.focus()
    return document.activeElement === target
  }
  const exposed = (target as { focus?: () => unknown }).focus
  if (typeof exposed === 'function') return exposed() !== false
  const el = (target as ComponentPublicInstance).$el
  return el instanceof HTMLElement ? focusTarget(el) : false
}

/**
 * Keyboard focus for every vee-validate form, so Enter or a click never leaves focus on <body>:
 * - `guard(handler)` wraps the submit handler: a second submit while one runs is ignored, because
 *   submit buttons are only `aria-disabled` while busy (a disabled button drops focus);
 * - `onInvalid` is vee-validate's second `handleSubmit` argument: it focuses the first field marked
 *   `aria-invalid="true"` in the submitted form;
 * - `focusOn(target)` moves focus to the outcome (a confirmation, the next step) once it is rendered;
 * - `afterError(alert)` after a server error: the first invalid field (400 field messages) or else the alert.
 * `onAttempt` runs on every submit, valid or not (e.g. to clear a server message from the last try).
 */
export function useFormFocus(isSubmitting: Ref<boolean>, options: { onAttempt?: () => void } = {}) {
  let form: HTMLFormElement | null = null

  function remember(event?: Event) {
    const el = event?.currentTarget instanceof HTMLFormElement ? event.currentTarget : event?.target
    if (el instanceof HTMLFormElement) form = el
    else if (el instanceof Element) form = el.closest('form') ?? form
  }

  function guard<R>(handler: (event?: Event) => Promise<R>) {
    return (event?: Event): Promise<R | undefined> => {
      if (isSubmitting.value) {
        event?.preventDefault()
        return Promise.resolve(undefined)
      }
      remember(event)
      options.onAttempt?.()
      return handler(event)
    }
  }

  /** Focuses the first field marked invalid in the last submitted form, once the errors are on screen. */
  async function focusFirstInvalid(): Promise<boolean> {
    await nextTick()
    if (!form?.isConnected) return false
    return focusTarget(form.querySelector<HTMLElement>('[aria-invalid="true"]'))
  }

  function onInvalid(ctx: { evt?: Event }) {
    remember(ctx.evt)
    void focusFirstInvalid()
  }

  async function focusOn(target: MaybeRefOrGetter<FocusTarget>): Promise<boolean> {
    await nextTick()
    return focusTarget(toValue(target))
  }

  async function afterError(alert: MaybeRefOrGetter<FocusTarget>): Promise<boolean> {
    return (await focusFirstInvalid()) || focusOn(alert)
  }

  return { guard, onInvalid, focusOn, afterError, focusFirstInvalid }
}
