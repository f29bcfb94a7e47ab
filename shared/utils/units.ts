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

/** Pascals per kilopascal and per megapascal (SI prefixes; NIST SP 811 B.8 lists pressure in Pa). */
export const PA_PER_KPA = 1_000
export const PA_PER_MPA = 1_000_000
/** The standard atmosphere, 101 325 Pa (NIST SP 811 B.8). */
export const STANDARD_ATMOSPHERE_PA = 101_325
/** Millimetres per inch, exact (NIST SP 811 B.8). */
export const MM_PER_INCH = 25.4
/** Cubic metres per cubic foot: 0.3048³ = 2.831 684 659 2 E-02, exact (NIST SP 811 B.8 gives 2.831 685 E-02). */
export const M3_PER_FT3 = 0.3048 ** 3
/** Joules per foot pound-force: 0.3048 m × 4.448 221 615 260 5 N = 1.355 817 948 J (NIST SP 811 B.8 gives 1.355 818). */
export const J_PER_FT_LBF = 0.3048 * 4.4482216152605

/** The units a pressure may be entered in; the ones shown are bar and psi (PressureUnit). */
export const PRESSURE_ENTRY_UNITS = ['bar', 'psi', 'kPa', 'MPa'] as const
export type PressureEntryUnit = typeof PRESSURE_ENTRY_UNITS[number]

const PA_PER_UNIT: Record<PressureEntryUnit, number> = { bar: PA_PER_BAR, psi: PA_PER_PSI, kPa: PA_PER_KPA, MPa: PA_PER_MPA }

/** `pressure` given in `unit` as pascals (gauge stays gauge, absolute stays absolute). */
export function pressureToPa(pressure: number, unit: PressureEntryUnit): number {
  return pressure * PA_PER_UNIT[unit]
}

/** `pressurePa` pascals in `unit`. */
export function pressureFromPa(pressurePa: number, unit: PressureEntryUnit): number {
  return pressurePa / PA_PER_UNIT[unit]
}

/**
 * A pressure LIMIT (a rated fill, a fill ceiling) for display: rounded DOWN, never up, so the figure a
 * member reads is never above the limit — bar to the hundredth it is stored in, psi to the whole psi.
 * (Rounding 9.99 bar to "10.0 bar" would print a limit the proof test did not give.) A tiny tolerance
 * keeps a value already on the step, such as 145.0000001 psi, from falling one step.
 */
export function formatPressureLimit(pressureBar: number, unit: PressureUnit): string {
  const floorTo = (value: number, step: number) => Math.floor(value / step + 1e-9) * step
  return unit === 'bar'
    ? `${floorTo(pressureBar, 0.01).toFixed(2)} bar`
    : `${floorTo(barToPsi(pressureBar), 1).toFixed(0)} psi`
}
