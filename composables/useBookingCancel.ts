import type { BookingDto } from '~~/shared/types/bookings'

/**
 * An officer with bookings.cancel_any cancelling another member's booking from a week view: which
 * booking's cancel form is open, with focus moved into the form and back to its button when it closes.
 */
export function useBookingCancel() {
  const session = useSessionStore()
  const canCancel = computed(() => session.can('bookings.cancel_any'))
  const cancelling = ref<BookingDto | null>(null)
  async function askCancel(booking: BookingDto) {
    cancelling.value = booking
    await nextTick()
    document.querySelector<HTMLElement>('[data-testid="booking-cancel-form"] textarea')?.focus()
  }
  async function closeCancel() {
    const id = cancelling.value?.id
    cancelling.value = null
    await nextTick()
    document.querySelector<HTMLElement>(`[data-cancel-for="${id}"]`)?.focus()
  }
  return { canCancel, cancelling, askCancel, closeCancel }
}
