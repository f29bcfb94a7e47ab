import { defineStore } from 'pinia'
import { computed, ref } from 'vue'

import { barToPsi, formatPressureLimit, type PressureUnit } from '~~/shared/utils/units'

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
    return unit === 'bar' ? `${pressureBar.toFixed(1)} bar` : `${Math.round(barToPsi(pressureBar))} psi`
  }

  /** `pressureBar` as { main, other }: the preferred unit and the other one for the small print. */
  function show(pressureBar: number) {
    return { main: inUnit(pressureBar, preference.value), other: inUnit(pressureBar, other.value) }
  }

  /** A pressure limit (a rated fill) as { main, other }, both rounded down: see formatPressureLimit. */
  function showLimit(pressureBar: number) {
    return { main: formatPressureLimit(pressureBar, preference.value), other: formatPressureLimit(pressureBar, other.value) }
  }

  return { preference, other, setPreference, inUnit, show, showLimit }
})
