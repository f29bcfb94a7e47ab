import { defineStore } from 'pinia'
import { computed, ref } from 'vue'

/** Pascals per pound-force per square inch (NIST SP 811, appendix B.8: 1 psi = 6.894 757 293 168 kPa). */
export const PA_PER_PSI = 6894.757293168
/** Pascals per bar (exact, by definition). */
export const PA_PER_BAR = 100_000

export type PressureUnit = 'bar' | 'psi'

/**
 * The member's unit preference for showing pressures: the preferred unit first, the other in small
 * print. Pressures are stored in bar gauge; this store only converts for display.
 */
export const useUnitsStore = defineStore('units', () => {
  const preference = ref<PressureUnit>('bar')
  const other = computed<PressureUnit>(() => (preference.value === 'bar' ? 'psi' : 'bar'))

  function setPreference(unit: PressureUnit) {
    preference.value = unit
  }

  /** `pressureBar` in `unit`, rounded for display (bar to 0.1, psi to 1). */
  function inUnit(pressureBar: number, unit: PressureUnit): string {
    return unit === 'bar' ? `${pressureBar.toFixed(1)} bar` : `${Math.round(pressureBar * PA_PER_BAR / PA_PER_PSI)} psi`
  }

  /** `pressureBar` as { main, other }: the preferred unit and the other one for the small print. */
  function show(pressureBar: number) {
    return { main: inUnit(pressureBar, preference.value), other: inUnit(pressureBar, other.value) }
  }

  return { preference, other, setPreference, inUnit, show }
})
