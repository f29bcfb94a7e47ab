/**
 * Pressure units: the pure conversions every screen and rule uses. Pressures are stored in bar
 * gauge; other units are converted on the way in and for display. Factors from NIST SP 811
 * (2008), Appendix B.
 */

/** Pascals per pound-force per square inch: 6.894 757 293 168 kPa (from the pound and the inch; NIST SP 811 B.8). */
export const PA_PER_PSI = 6894.757293168
/** Pascals per bar (exact, by definition; NIST SP 811 B.8). */
export const PA_PER_BAR = 100_000

export type PressureUnit = 'bar' | 'psi'

/** Pressure in psi for `pressureBar` bar. */
export function barToPsi(pressureBar: number): number {
  return pressureBar * PA_PER_BAR / PA_PER_PSI
}

/** Pressure in bar for `pressurePsi` psi. */
export function psiToBar(pressurePsi: number): number {
  return pressurePsi * PA_PER_PSI / PA_PER_BAR
}
