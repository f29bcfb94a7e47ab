/**
 * The pressure-vessel arithmetic: stored energy of an air charge and the distance to keep, thin-wall
 * stresses, laminate plies and burst estimates, rated fill and proof expiry, resin to mix. Pure
 * functions with the unit in every name, shared by pages and server. Each function refuses input
 * that cannot describe a real vessel (NaN, infinities, zero or negative sizes, water filling the
 * whole vessel, pressure below a perfect vacuum) with a VesselArithmeticError a person can read.
 *
 * These are estimates from published formulas. They do not replace the club's rules, local codes or
 * a qualified person's judgement, and only a witnessed proof test rates a vessel.
 */
import { addCalendarDays, addCalendarMonths } from './dates'
import { PA_PER_BAR, PA_PER_MPA, pressureFromPa, pressureToPa, type PressureEntryUnit } from './units'

/** Input that no real vessel or layup can have; `field` names the input, `message` says what is wrong. */
export class VesselArithmeticError extends Error {
  readonly field: string
  constructor(field: string, message: string) {
    super(message)
    this.name = 'VesselArithmeticError'
    this.field = field
  }
}

function finite(value: number, field: string, label: string): number {
  if (typeof value !== 'number' || Number.isNaN(value)) throw new VesselArithmeticError(field, `${label} must be a number.`)
  if (!Number.isFinite(value)) throw new VesselArithmeticError(field, `${label} must be a finite number, not infinity.`)
  return value
}

function positive(value: number, field: string, label: string): number {
  if (finite(value, field, label) <= 0) throw new VesselArithmeticError(field, `${label} must be more than 0 (got ${value}).`)
  return value
}

function nonNegative(value: number, field: string, label: string): number {
  if (finite(value, field, label) < 0) throw new VesselArithmeticError(field, `${label} cannot be negative (got ${value}).`)
  return value
}

/** A fraction strictly between 0 and 1. */
function fraction(value: number, field: string, label: string): number {
  if (finite(value, field, label) <= 0 || value >= 1) throw new VesselArithmeticError(field, `${label} must lie between 0 and 1 (got ${value}).`)
  return value
}

function wholeNumber(value: number, field: string, label: string, min: number): number {
  if (!Number.isInteger(finite(value, field, label)) || value < min) throw new VesselArithmeticError(field, `${label} must be a whole number of at least ${min} (got ${value}).`)
  return value
}

const ISO_DATE = /^\d{4}-\d{2}-\d{2}$/
function calendarDate(value: string, field: string, label: string): string {
  const ok = typeof value === 'string' && ISO_DATE.test(value) && new Date(`${value}T00:00:00Z`).toISOString().startsWith(value)
  if (!ok) throw new VesselArithmeticError(field, `${label} must be a calendar date written YYYY-MM-DD (got ${String(value)}).`)
  return value
}

// ─── Stored energy of an air charge, TNT equivalent, minimum distance ────────────────────────────
// ASME PCC-2 (2008) Part 5 Art. 5.1, Mandatory Appendix II (501-II in later editions): the energy a
// compressed gas releases expanding to the atmosphere, and Mandatory Appendix III (501-III): the
// minimum distance to people during a pneumatic test.

/** The atmosphere ASME PCC-2's stored-energy formula uses, Pa = 101 000 Pa (App. II). */
export const PCC2_ATMOSPHERE_PA = 101_000
/** The same atmosphere in the code's US customary form, 14.7 psia (App. II). */
export const PCC2_ATMOSPHERE_PSIA = 14.7
/** Ratio of specific heats of air and nitrogen, k = 1.4 (ASME PCC-2 App. II). */
export const AIR_HEAT_CAPACITY_RATIO = 1.4
/** Joules per kilogram of TNT in ASME PCC-2 App. II: TNT [kg] = E [J] / 4 266 920. */
export const J_PER_KG_TNT = 4_266_920
/** Foot pound-force per pound of TNT in ASME PCC-2 App. II: TNT [lb] = E [ft·lbf] / 1 488 617. */
export const FT_LBF_PER_LB_TNT = 1_488_617
/** The smallest scaled distance ASME PCC-2 App. III allows, 20 m/kg^⅓. */
export const MIN_SCALED_DISTANCE_M_PER_CBRT_KG = 20
/** Stored energies at which the minimum-distance floor of ASME PCC-2 App. III steps (J): 30 m up to 135.5 MJ, 60 m up to 271 MJ. */
export const DISTANCE_FLOOR_STEPS_J = [135.5e6, 271e6] as const

/**
 * The two written forms of the scaled distance, a club setting: `tnt` R = Rs·TNT^⅓ (ASME PCC-2 2008,
 * App. III) and `2tnt` R = Rs·(2·TNT)^⅓ (a later edition's 501-III).
 */
export const DISTANCE_RULES = ['tnt', '2tnt'] as const
export type DistanceRule = typeof DISTANCE_RULES[number]

/** Absolute pressure in Pa for a gauge pressure in Pa over `atmospherePa`; refuses a pressure below a perfect vacuum. */
export function absolutePressurePa(gaugePressurePa: number, atmospherePa = PCC2_ATMOSPHERE_PA): number {
  finite(gaugePressurePa, 'pressure', 'The gauge pressure')
  positive(atmospherePa, 'atmospherePa', 'The atmospheric pressure')
  const absolutePa = gaugePressurePa + atmospherePa
  if (absolutePa < 0) {
    throw new VesselArithmeticError('pressure', `A gauge pressure of ${gaugePressurePa} Pa is below a perfect vacuum (${-atmospherePa} Pa gauge).`)
  }
  return absolutePa
}

function checkAbsolutePa(absolutePressurePa: number): number {
  if (nonNegative(absolutePressurePa, 'absolutePressurePa', 'The absolute pressure') === 0) return 0
  return absolutePressurePa
}

/**
 * Stored energy in J of `airVolumeM3` of a gas with ratio of specific heats `heatCapacityRatio` at
 * `absolutePressurePa`, expanding to the code's atmosphere:
 * E = Pat·V/(k−1)·[1 − (Pa/Pat)^((k−1)/k)] (ASME PCC-2 (2008) Mandatory App. II, general form).
 * At or below the atmosphere nothing is stored to release outward, so the energy is 0.
 */
export function storedEnergyGasJ(absolutePressurePa: number, airVolumeM3: number, heatCapacityRatio: number): number {
  const pat = checkAbsolutePa(absolutePressurePa)
  positive(airVolumeM3, 'airVolumeM3', 'The air volume')
  if (finite(heatCapacityRatio, 'heatCapacityRatio', 'The ratio of specific heats') <= 1) {
    throw new VesselArithmeticError('heatCapacityRatio', `The ratio of specific heats must be more than 1 (got ${heatCapacityRatio}).`)
  }
  if (pat <= PCC2_ATMOSPHERE_PA) return 0
  const k = heatCapacityRatio
  return pat * airVolumeM3 / (k - 1) * (1 - (PCC2_ATMOSPHERE_PA / pat) ** ((k - 1) / k))
}

/**
 * Stored energy in J of `airVolumeM3` of air or nitrogen at `absolutePressurePa`, in the code's own
 * k = 1.4 form: E = 2.5·Pat·V·[1 − (Pa/Pat)^0.286], Pa = 101 000 Pa (ASME PCC-2 (2008) Mandatory
 * App. II). 0 at or below the atmosphere.
 */
export function storedEnergyAirJ(absolutePressurePa: number, airVolumeM3: number): number {
  const pat = checkAbsolutePa(absolutePressurePa)
  positive(airVolumeM3, 'airVolumeM3', 'The air volume')
  if (pat <= PCC2_ATMOSPHERE_PA) return 0
  return 2.5 * pat * airVolumeM3 * (1 - (PCC2_ATMOSPHERE_PA / pat) ** 0.286)
}

/**
 * Stored energy in ft·lbf of `airVolumeFt3` of air at `absolutePressurePsia`, the code's US customary
 * form: E = 360·Pat·V·[1 − (14.7/Pat)^0.286] (ASME PCC-2 (2008) Mandatory App. II). 0 at or below 14.7 psia.
 */
export function storedEnergyAirFtLbf(absolutePressurePsia: number, airVolumeFt3: number): number {
  const pat = nonNegative(absolutePressurePsia, 'absolutePressurePsia', 'The absolute pressure')
  positive(airVolumeFt3, 'airVolumeFt3', 'The air volume')
  if (pat <= PCC2_ATMOSPHERE_PSIA) return 0
  return 360 * pat * airVolumeFt3 * (1 - (PCC2_ATMOSPHERE_PSIA / pat) ** 0.286)
}

/** TNT equivalent in kg of `storedEnergyJ`: E / 4 266 920 (ASME PCC-2 (2008) Mandatory App. II). */
export function tntEquivalentKg(storedEnergyJ: number): number {
  return nonNegative(storedEnergyJ, 'storedEnergyJ', 'The stored energy') / J_PER_KG_TNT
}

/** TNT equivalent in lb of `storedEnergyFtLbf`: E / 1 488 617 (ASME PCC-2 (2008) Mandatory App. II). */
export function tntEquivalentLb(storedEnergyFtLbf: number): number {
  return nonNegative(storedEnergyFtLbf, 'storedEnergyFtLbf', 'The stored energy') / FT_LBF_PER_LB_TNT
}

export interface MinimumDistance {
  /** The distance to keep people at, m: the greater of the floor and the scaled distance. */
  minimumDistanceM: number
  /** The code's floor for this energy, m (30 m up to 135.5 MJ, 60 m above). */
  floorDistanceM: number
  /** Rs·TNT^⅓ or Rs·(2·TNT)^⅓, m. */
  scaledDistanceM: number
  /** Which of the two set the minimum. */
  governedBy: 'floor' | 'scaled'
}

/**
 * The minimum distance to people for `storedEnergyJ` (ASME PCC-2 Mandatory App. III / 501-III): the
 * greater of (a) 30 m when E ≤ 135.5 MJ, 60 m above, and (b) R = Rs·TNT^⅓ (`tnt`, 2008 edition) or
 * R = Rs·(2·TNT)^⅓ (`2tnt`, a later edition), with Rs at least 20 m/kg^⅓.
 */
export function minimumDistance(storedEnergyJ: number, rule: DistanceRule, scaledDistanceMPerCbrtKg = MIN_SCALED_DISTANCE_M_PER_CBRT_KG): MinimumDistance {
  const tntKg = tntEquivalentKg(storedEnergyJ)
  if (!DISTANCE_RULES.includes(rule)) throw new VesselArithmeticError('distanceRule', `The distance rule must be "tnt" or "2tnt" (got ${String(rule)}).`)
  if (finite(scaledDistanceMPerCbrtKg, 'scaledDistance', 'The scaled distance') < MIN_SCALED_DISTANCE_M_PER_CBRT_KG) {
    throw new VesselArithmeticError('scaledDistance', `ASME PCC-2 asks for a scaled distance of at least ${MIN_SCALED_DISTANCE_M_PER_CBRT_KG} m/kg^⅓ (got ${scaledDistanceMPerCbrtKg}).`)
  }
  const floorDistanceM = storedEnergyJ <= DISTANCE_FLOOR_STEPS_J[0] ? 30 : 60
  const scaledDistanceM = scaledDistanceMPerCbrtKg * Math.cbrt(rule === 'tnt' ? tntKg : 2 * tntKg)
  const governedBy = scaledDistanceM > floorDistanceM ? 'scaled' : 'floor'
  return { minimumDistanceM: Math.max(floorDistanceM, scaledDistanceM), floorDistanceM, scaledDistanceM, governedBy }
}

/**
 * The air in a water rocket's vessel, L: the vessel volume minus the water (the water stores almost
 * nothing). Refuses water that fills the whole vessel.
 */
export function airVolumeL(vesselVolumeL: number, waterVolumeL: number): number {
  positive(vesselVolumeL, 'vesselVolumeL', 'The vessel volume (L)')
  nonNegative(waterVolumeL, 'waterVolumeL', 'The water volume (L)')
  if (waterVolumeL >= vesselVolumeL) {
    throw new VesselArithmeticError('waterVolumeL', `The water (${waterVolumeL} L) must be less than the vessel volume (${vesselVolumeL} L): there is no air charge left.`)
  }
  return vesselVolumeL - waterVolumeL
}

export interface AirChargeInput {
  /** Gauge pressure in `unit`. */
  gaugePressure: number
  unit: PressureEntryUnit
  vesselVolumeL: number
  waterVolumeL: number
  distanceRule: DistanceRule
}

/** An air charge's figures, as the public calculation route answers them. */
export interface AirCharge {
  airVolumeL: number
  /** Gauge pressure plus the code's atmosphere, 101 000 Pa. */
  absolutePressurePa: number
  storedEnergyJ: number
  tntEquivalentKg: number
  minimumDistanceM: number
  distanceRule: DistanceRule
}

/**
 * Everything about one air charge: the air volume (vessel minus water), the absolute pressure over the
 * code's atmosphere, the stored energy in the code's k = 1.4 form, its TNT equivalent and the minimum
 * distance to people by `distanceRule` (ASME PCC-2 (2008) Mandatory App. II and III).
 */
export function airCharge(input: AirChargeInput): AirCharge {
  const airL = airVolumeL(input.vesselVolumeL, input.waterVolumeL)
  finite(input.gaugePressure, 'pressure', 'The pressure')
  const gaugePa = pressureToPa(input.gaugePressure, input.unit)
  if (!Number.isFinite(gaugePa)) throw new VesselArithmeticError('unit', `The pressure unit must be bar, psi, kPa or MPa (got ${String(input.unit)}).`)
  if (gaugePa + PCC2_ATMOSPHERE_PA < 0) {
    const vacuum = pressureFromPa(-PCC2_ATMOSPHERE_PA, input.unit)
    throw new VesselArithmeticError('pressure', `A gauge pressure of ${input.gaugePressure} ${input.unit} is below a perfect vacuum (${vacuum.toPrecision(4)} ${input.unit} gauge).`)
  }
  const absolutePa = absolutePressurePa(gaugePa)
  const storedEnergyJ = storedEnergyAirJ(absolutePa, airL / 1000)
  const distance = minimumDistance(storedEnergyJ, input.distanceRule)
  return {
    airVolumeL: airL,
    absolutePressurePa: absolutePa,
    storedEnergyJ,
    tntEquivalentKg: tntEquivalentKg(storedEnergyJ),
    minimumDistanceM: distance.minimumDistanceM,
    distanceRule: input.distanceRule,
  }
}

// ─── Thin-wall cylinder stress and Barlow's formula ──────────────────────────────────────────────
// Any mechanics-of-materials text (the thin-walled pressure vessel chapter); Barlow's formula as
// piping codes use it. MPa and mm throughout (1 MPa = 1 N/mm²).

export interface ThinWallInput {
  /** Internal (gauge) pressure, MPa. */
  pressureMPa: number
  radiusMm: number
  wallThicknessMm: number
}

function thinWallInput({ pressureMPa, radiusMm, wallThicknessMm }: ThinWallInput): ThinWallInput {
  nonNegative(pressureMPa, 'pressureMPa', 'The internal pressure (MPa)')
  positive(radiusMm, 'radiusMm', 'The radius (mm)')
  positive(wallThicknessMm, 'wallThicknessMm', 'The wall thickness (mm)')
  return { pressureMPa, radiusMm, wallThicknessMm }
}

/** Hoop (circumferential) stress of a thin-walled cylinder, MPa: σ = P·r/t. */
export function hoopStressMPa(input: ThinWallInput): number {
  const { pressureMPa, radiusMm, wallThicknessMm } = thinWallInput(input)
  return pressureMPa * radiusMm / wallThicknessMm
}

/** Axial stress of a thin-walled cylinder with closed ends, MPa: σ = P·r/(2t). */
export function axialStressMPa(input: ThinWallInput): number {
  return hoopStressMPa(input) / 2
}

/** Membrane stress of a thin-walled sphere, MPa: σ = P·r/(2t). */
export function sphereStressMPa(input: ThinWallInput): number {
  return hoopStressMPa(input) / 2
}

/** The pressure in MPa at which a thin cylinder's hoop stress reaches `stressMPa`: P = σ·t/r. */
export function pressureAtHoopStressMPa({ stressMPa, radiusMm, wallThicknessMm }: { stressMPa: number, radiusMm: number, wallThicknessMm: number }): number {
  positive(stressMPa, 'stressMPa', 'The stress (MPa)')
  positive(radiusMm, 'radiusMm', 'The radius (mm)')
  positive(wallThicknessMm, 'wallThicknessMm', 'The wall thickness (mm)')
  return stressMPa * wallThicknessMm / radiusMm
}

/** The smallest radius-to-wall ratio for which the thin-wall formulas hold (r/t ≥ 10). */
export const THIN_WALL_MIN_RATIO = 10

/** r/t and whether the thin-wall formulas hold for it (r/t ≥ 10). */
export function thinWallCheck({ radiusMm, wallThicknessMm }: { radiusMm: number, wallThicknessMm: number }): { radiusToWallRatio: number, thinWall: boolean } {
  positive(radiusMm, 'radiusMm', 'The radius (mm)')
  positive(wallThicknessMm, 'wallThicknessMm', 'The wall thickness (mm)')
  const radiusToWallRatio = radiusMm / wallThicknessMm
  return { radiusToWallRatio, thinWall: radiusToWallRatio >= THIN_WALL_MIN_RATIO }
}

/**
 * Barlow's formula, MPa: P = 2·S·t/D with D the outside diameter. With S the material's ultimate
 * strength it estimates the burst pressure; with an allowable stress, the working pressure.
 */
export function barlowPressureMPa({ strengthMPa, wallThicknessMm, outsideDiameterMm }: { strengthMPa: number, wallThicknessMm: number, outsideDiameterMm: number }): number {
  positive(strengthMPa, 'strengthMPa', 'The strength (MPa)')
  positive(wallThicknessMm, 'wallThicknessMm', 'The wall thickness (mm)')
  positive(outsideDiameterMm, 'outsideDiameterMm', 'The outside diameter (mm)')
  if (2 * wallThicknessMm >= outsideDiameterMm) {
    throw new VesselArithmeticError('wallThicknessMm', `A wall of ${wallThicknessMm} mm leaves no bore in a tube of ${outsideDiameterMm} mm outside diameter.`)
  }
  return 2 * strengthMPa * wallThicknessMm / outsideDiameterMm
}

// ─── Laminates ──────────────────────────────────────────────────────────────────────────────────

export const FIBRE_CLASSES = ['e_glass', 's_glass', 'carbon', 'aramid'] as const
export type FibreClass = typeof FIBRE_CLASSES[number]

export interface FibreProperties {
  label: string
  modulusGPa: number
  strengthMPa: number
  densityGPerCm3: number
}

/**
 * Generic fibre classes (a National Research Council fibre-property table, with two textbook tables
 * agreeing). Where the table gives a range, the value here is the end that gives the lower burst
 * estimate: the lowest strength and modulus, the highest density.
 */
export const FIBRE_PROPERTIES: Record<FibreClass, FibreProperties> = {
  e_glass: { label: 'E-glass', modulusGPa: 72.4, strengthMPa: 3450, densityGPerCm3: 2.54 },
  s_glass: { label: 'S-glass', modulusGPa: 85.5, strengthMPa: 4590, densityGPerCm3: 2.49 },
  carbon: { label: 'Standard-modulus PAN carbon', modulusGPa: 230, strengthMPa: 2500, densityGPerCm3: 1.80 },
  aramid: { label: 'Para-aramid, high-modulus grade', modulusGPa: 124, strengthMPa: 3600, densityGPerCm3: 1.47 },
}

/**
 * How much of the fibre's strength a fabric carries round the hoop: 0.5 for balanced 0/90 woven
 * cloth (half the fibres run the other way), 1.0 for tow wound round the hoop.
 */
export const WEAVE_FACTORS = { woven_0_90: 0.5, hoop_tow: 1.0 } as const
export type Weave = keyof typeof WEAVE_FACTORS

/** The share of the fibre's strength a hand layup realises, 0.5 (from memory, not a published figure); a club setting. */
export const DEFAULT_HAND_LAYUP_PROCESS_FACTOR = 0.5

const G_PER_M2_TO_MM = 1 / 1000 // (g/m²) / (g/cm³) = 1e-6 m = 1e-3 mm

/** Cured ply thickness in mm from the fabric's areal weight, fibre density and fibre volume fraction: t = FAW/(ρf·Vf). */
export function curedPlyThicknessMm({ arealWeightGPerM2, fibreDensityGPerCm3, fibreVolumeFraction }: { arealWeightGPerM2: number, fibreDensityGPerCm3: number, fibreVolumeFraction: number }): number {
  positive(arealWeightGPerM2, 'arealWeightGPerM2', 'The fabric areal weight (g/m²)')
  positive(fibreDensityGPerCm3, 'fibreDensityGPerCm3', 'The fibre density (g/cm³)')
  fraction(fibreVolumeFraction, 'fibreVolumeFraction', 'The fibre volume fraction')
  return arealWeightGPerM2 / (fibreDensityGPerCm3 * fibreVolumeFraction) * G_PER_M2_TO_MM
}

/** Fibre volume fraction from the fibre mass fraction: Vf = (Wf/ρf) / [Wf/ρf + (1−Wf)/ρm]. */
export function fibreVolumeFraction({ fibreMassFraction, fibreDensityGPerCm3, resinDensityGPerCm3 }: { fibreMassFraction: number, fibreDensityGPerCm3: number, resinDensityGPerCm3: number }): number {
  fraction(fibreMassFraction, 'fibreMassFraction', 'The fibre mass fraction')
  positive(fibreDensityGPerCm3, 'fibreDensityGPerCm3', 'The fibre density (g/cm³)')
  positive(resinDensityGPerCm3, 'resinDensityGPerCm3', 'The resin density (g/cm³)')
  const fibre = fibreMassFraction / fibreDensityGPerCm3
  return fibre / (fibre + (1 - fibreMassFraction) / resinDensityGPerCm3)
}

/**
 * A ply whose total areal weight (fibre and resin, as a prepreg is sold) and fibre mass fraction are
 * known: the fibre's and the resin's share of the thickness, the ply thickness and its Vf.
 */
export function plyFromTotalArealWeight(input: { totalArealWeightGPerM2: number, fibreMassFraction: number, fibreDensityGPerCm3: number, resinDensityGPerCm3: number }): { fibreThicknessMm: number, resinThicknessMm: number, plyThicknessMm: number, fibreVolumeFraction: number } {
  positive(input.totalArealWeightGPerM2, 'totalArealWeightGPerM2', 'The total areal weight (g/m²)')
  const vf = fibreVolumeFraction(input)
  const fibreThicknessMm = input.totalArealWeightGPerM2 * input.fibreMassFraction / input.fibreDensityGPerCm3 * G_PER_M2_TO_MM
  const resinThicknessMm = input.totalArealWeightGPerM2 * (1 - input.fibreMassFraction) / input.resinDensityGPerCm3 * G_PER_M2_TO_MM
  return { fibreThicknessMm, resinThicknessMm, plyThicknessMm: fibreThicknessMm + resinThicknessMm, fibreVolumeFraction: vf }
}

/** Modulus along the fibres by the rule of mixtures, GPa: E = Ef·Vf + Em·(1−Vf). */
export function ruleOfMixturesModulusGPa({ fibreModulusGPa, matrixModulusGPa, fibreVolumeFraction }: { fibreModulusGPa: number, matrixModulusGPa: number, fibreVolumeFraction: number }): number {
  positive(fibreModulusGPa, 'fibreModulusGPa', 'The fibre modulus (GPa)')
  positive(matrixModulusGPa, 'matrixModulusGPa', 'The matrix modulus (GPa)')
  fraction(fibreVolumeFraction, 'fibreVolumeFraction', 'The fibre volume fraction')
  return fibreModulusGPa * fibreVolumeFraction + matrixModulusGPa * (1 - fibreVolumeFraction)
}

export interface LaminateBurstInput {
  plies: number
  arealWeightGPerM2: number
  fibreDensityGPerCm3: number
  fibreVolumeFraction: number
  fibreStrengthMPa: number
  weave: Weave
  /** The share of fibre strength the process realises (club setting; hand layup 0.5 from memory). */
  processFactor?: number
  /** The diameter the laminate is laid on, mm. */
  layupDiameterMm: number
}

/** The wording every burst estimate carries. */
export const BURST_ESTIMATE_NOTE = 'An estimate from generic fibre properties, not a rating: only a witnessed proof test rates a vessel.'

export interface LaminateBurstEstimate {
  /** Always true: this figure is an estimate and must be shown as one. */
  estimate: true
  note: typeof BURST_ESTIMATE_NOTE
  /** Cured laminate thickness, mm: plies × ply thickness. */
  laminateThicknessMm: number
  /** σ_hoop = σf·Vf·k_weave·k_process, MPa. */
  hoopStrengthMPa: number
  burstPressureMPa: number
  burstPressureBar: number
}

/**
 * Estimated burst pressure of a laminate tube: P = 2·t·σ_hoop/D with t = plies × FAW/(ρf·Vf) and
 * σ_hoop = σf·Vf·k_weave·k_process (Barlow's formula over a rule-of-mixtures strength). Always
 * flagged as an estimate.
 */
export function laminateBurstEstimate(input: LaminateBurstInput): LaminateBurstEstimate {
  wholeNumber(input.plies, 'plies', 'The number of plies', 1)
  positive(input.fibreStrengthMPa, 'fibreStrengthMPa', 'The fibre strength (MPa)')
  positive(input.layupDiameterMm, 'layupDiameterMm', 'The layup diameter (mm)')
  if (!(input.weave in WEAVE_FACTORS)) throw new VesselArithmeticError('weave', `The weave must be woven_0_90 or hoop_tow (got ${String(input.weave)}).`)
  const processFactor = input.processFactor ?? DEFAULT_HAND_LAYUP_PROCESS_FACTOR
  if (positive(processFactor, 'processFactor', 'The process factor') > 1) {
    throw new VesselArithmeticError('processFactor', `The process factor cannot exceed 1 (got ${processFactor}).`)
  }
  const laminateThicknessMm = input.plies * curedPlyThicknessMm(input)
  const hoopStrengthMPa = input.fibreStrengthMPa * input.fibreVolumeFraction * WEAVE_FACTORS[input.weave] * processFactor
  const burstPressureMPa = 2 * laminateThicknessMm * hoopStrengthMPa / input.layupDiameterMm
  return {
    estimate: true,
    note: BURST_ESTIMATE_NOTE,
    laminateThicknessMm,
    hoopStrengthMPa,
    burstPressureMPa,
    burstPressureBar: burstPressureMPa * PA_PER_MPA / PA_PER_BAR,
  }
}

// ─── Rated fill and proof expiry ────────────────────────────────────────────────────────────────

/** Vessel constructions; the first two are "bottles", the rest "laminates" for the proof limits. */
export const VESSEL_CONSTRUCTIONS = ['single_bottle', 'spliced_bottles', 'overwrapped_liner', 'mandrel_tube', 'other'] as const
export type VesselConstruction = typeof VESSEL_CONSTRUCTIONS[number]
export type ConstructionFamily = 'bottle' | 'laminate'

/** "Bottle" limits apply to single and spliced bottles; "laminate" limits to everything else. */
export function constructionFamily(construction: VesselConstruction): ConstructionFamily {
  if (!VESSEL_CONSTRUCTIONS.includes(construction)) throw new VesselArithmeticError('construction', `Unknown construction ${String(construction)}.`)
  return construction === 'single_bottle' || construction === 'spliced_bottles' ? 'bottle' : 'laminate'
}

/** The smallest proof margin a club may set (proof pressure ÷ rated fill). */
export const MIN_PROOF_MARGIN = 1.25

/**
 * The starting proof policy, which each club may change: margin 1.5 (water-rocket common practice:
 * proof-test full of water to at least 1.5 × the intended fill), proof valid 12 months (6 for spliced
 * bottles), 10 fills for bottles and 25 for laminates, 7 days' cure before the first proof.
 */
export const DEFAULT_PROOF_POLICY = {
  marginRatio: 1.5,
  intervalMonths: { single_bottle: 12, spliced_bottles: 6, overwrapped_liner: 12, mandrel_tube: 12, other: 12 } as Record<VesselConstruction, number>,
  fillLimit: { bottle: 10, laminate: 25 } as Record<ConstructionFamily, number>,
  cureWaitDays: 7,
}

/** Rated fill in bar from a passed proof at `proofPressureBar` (gauge) and the club's margin: proof ÷ margin (margin ≥ 1.25). */
export function ratedFillBar(proofPressureBar: number, marginRatio: number): number {
  positive(proofPressureBar, 'proofPressureBar', 'The proof pressure (bar)')
  if (finite(marginRatio, 'marginRatio', 'The proof margin') < MIN_PROOF_MARGIN) {
    throw new VesselArithmeticError('marginRatio', `The proof margin must be at least ${MIN_PROOF_MARGIN} (got ${marginRatio}).`)
  }
  return proofPressureBar / marginRatio
}

/** The first day a proof test may be recorded: the last layup date plus the cure wait in days. */
export function earliestProofDate(lastLayupDate: string, cureWaitDays: number): string {
  calendarDate(lastLayupDate, 'lastLayupDate', 'The last layup date')
  wholeNumber(cureWaitDays, 'cureWaitDays', 'The cure wait (days)', 0)
  return addCalendarDays(lastLayupDate, cureWaitDays)
}

/** What ends a proof at once: the vessel must be tested again. */
export const PROOF_INVALIDATING_EVENTS = ['repair', 'modification', 'damage', 'crash', 'incident', 'heat_exposure'] as const
export type ProofInvalidatingEvent = typeof PROOF_INVALIDATING_EVENTS[number]

const EVENT_WORDS: Record<ProofInvalidatingEvent, string> = {
  repair: 'a repair', modification: 'a modification', damage: 'reported damage', crash: 'a crash',
  incident: 'an incident', heat_exposure: 'suspected heat exposure',
}

export type ProofLapseCode = 'PROOF_INTERVAL_PASSED' | 'PROOF_FILL_LIMIT_REACHED' | 'PROOF_INVALIDATED'

export interface ProofStandingInput {
  /** The date of the passed proof test (YYYY-MM-DD). */
  testedOn: string
  construction: VesselConstruction
  /** Fills recorded since that proof. */
  fillsSinceProof: number
  /** Events that end a proof; only those dated after the test count (one on the test day is what the test answered). */
  events?: { kind: ProofInvalidatingEvent, on: string }[]
  /** The club's today (YYYY-MM-DD in its time zone). */
  today: string
  /** The club's interval for this construction, months (default from DEFAULT_PROOF_POLICY). */
  intervalMonths?: number
  /** The club's fill limit for this construction's family (default from DEFAULT_PROOF_POLICY). */
  fillLimit?: number
}

export interface ProofStanding {
  /** The last day the proof is current by time (inclusive): test date + interval months. */
  validThroughDate: string
  fillLimit: number
  /** Fills still allowed before the proof lapses by count (0 when it has). */
  fillsRemaining: number
  lapsed: boolean
  /** Why the proof has lapsed: every reason that applies, with a plain sentence each. */
  reasons: { code: ProofLapseCode, message: string }[]
}

/**
 * Whether a passed proof still stands: it lapses after the interval for the construction (current
 * through test date + interval, month-end clamped), when the fills since the proof reach the limit (the
 * fill that reaches it is allowed, the next is not), or at once after a repair, modification, damage,
 * crash, incident or suspected heat exposure dated after the test.
 */
export function proofStanding(input: ProofStandingInput): ProofStanding {
  calendarDate(input.testedOn, 'testedOn', 'The proof test date')
  calendarDate(input.today, 'today', 'Today\'s date')
  const family = constructionFamily(input.construction)
  const intervalMonths = wholeNumber(input.intervalMonths ?? DEFAULT_PROOF_POLICY.intervalMonths[input.construction], 'intervalMonths', 'The proof interval (months)', 1)
  const fillLimit = wholeNumber(input.fillLimit ?? DEFAULT_PROOF_POLICY.fillLimit[family], 'fillLimit', 'The fill limit', 1)
  const fills = wholeNumber(input.fillsSinceProof, 'fillsSinceProof', 'The fills since the proof', 0)

  const validThroughDate = addCalendarMonths(input.testedOn, intervalMonths)
  const reasons: ProofStanding['reasons'] = []
  if (input.today > validThroughDate) {
    reasons.push({ code: 'PROOF_INTERVAL_PASSED', message: `The proof of ${input.testedOn} was current through ${validThroughDate} (${intervalMonths} months).` })
  }
  if (fills >= fillLimit) {
    reasons.push({ code: 'PROOF_FILL_LIMIT_REACHED', message: `${fills} fills since the proof reach the limit of ${fillLimit}.` })
  }
  const ending = (input.events ?? [])
    .map((e, i) => {
      calendarDate(e.on, `events.${i}.on`, 'The event date')
      if (!PROOF_INVALIDATING_EVENTS.includes(e.kind)) throw new VesselArithmeticError(`events.${i}.kind`, `Unknown event ${String(e.kind)}.`)
      return e
    })
    .filter(e => e.on > input.testedOn && e.on <= input.today)
    .sort((a, b) => a.on.localeCompare(b.on))[0]
  if (ending) {
    reasons.push({ code: 'PROOF_INVALIDATED', message: `The proof ended on ${ending.on} with ${EVENT_WORDS[ending.kind]}; the vessel needs a new proof test.` })
  }
  return { validThroughDate, fillLimit, fillsRemaining: Math.max(0, fillLimit - fills), lapsed: reasons.length > 0, reasons }
}

// ─── Resin to mix ───────────────────────────────────────────────────────────────────────────────
// Common practice for a wet hand layup: woven cloth takes about its own weight in mixed resin, plus
// 15–20 % waste. The hardener follows the resin maker's mix ratio, stated by weight or by volume;
// the two are not interchangeable.

/** The waste allowance added to the resin a layup needs (common practice: 15–20 %). */
export const DEFAULT_RESIN_WASTE_FRACTION = 0.2

export type MixRatio
  = | { basis: 'weight', resinParts: number, hardenerParts: number }
    | { basis: 'volume', resinParts: number, hardenerParts: number, resinDensityGPerMl: number, hardenerDensityGPerMl: number }

export interface ResinToMixInput {
  clothAreaM2: number
  arealWeightGPerM2: number
  plies: number
  /** Mixed resin per gram of cloth (woven cloth about 1). */
  resinPerClothRatio?: number
  wasteFraction?: number
  mixRatio: MixRatio
}

export interface ResinToMix {
  clothMassG: number
  /** Resin and hardener together, waste included. */
  mixedMassG: number
  basis: MixRatio['basis']
  resinG: number
  hardenerG: number
  /** Volumes to measure when the ratio is by volume; null when it is by weight. */
  resinMl: number | null
  hardenerMl: number | null
}

/**
 * Resin and hardener to mix for a layup: cloth mass × resin ratio × (1 + waste), split by the maker's
 * mix ratio. A ratio by volume needs both densities to turn the mass into volumes to measure.
 */
export function resinToMix(input: ResinToMixInput): ResinToMix {
  positive(input.clothAreaM2, 'clothAreaM2', 'The cloth area (m²)')
  positive(input.arealWeightGPerM2, 'arealWeightGPerM2', 'The fabric areal weight (g/m²)')
  wholeNumber(input.plies, 'plies', 'The number of plies', 1)
  const ratio = positive(input.resinPerClothRatio ?? 1, 'resinPerClothRatio', 'The resin-to-cloth ratio')
  const waste = nonNegative(input.wasteFraction ?? DEFAULT_RESIN_WASTE_FRACTION, 'wasteFraction', 'The waste allowance')
  if (waste >= 1) throw new VesselArithmeticError('wasteFraction', `The waste allowance is a fraction below 1 (0.2 for 20 %), got ${waste}.`)
  const { mixRatio } = input
  positive(mixRatio.resinParts, 'mixRatio.resinParts', 'The resin parts of the mix ratio')
  positive(mixRatio.hardenerParts, 'mixRatio.hardenerParts', 'The hardener parts of the mix ratio')

  const clothMassG = input.clothAreaM2 * input.arealWeightGPerM2 * input.plies
  const mixedMassG = clothMassG * ratio * (1 + waste)
  if (mixRatio.basis === 'weight') {
    const parts = mixRatio.resinParts + mixRatio.hardenerParts
    return { clothMassG, mixedMassG, basis: 'weight', resinG: mixedMassG * mixRatio.resinParts / parts, hardenerG: mixedMassG * mixRatio.hardenerParts / parts, resinMl: null, hardenerMl: null }
  }
  if (mixRatio.basis !== 'volume') throw new VesselArithmeticError('mixRatio.basis', 'A mix ratio is by weight or by volume.')
  positive(mixRatio.resinDensityGPerMl, 'mixRatio.resinDensityGPerMl', 'The resin density (g/ml)')
  positive(mixRatio.hardenerDensityGPerMl, 'mixRatio.hardenerDensityGPerMl', 'The hardener density (g/ml)')
  // Millilitres per part so that the two volumes together weigh the mixed mass.
  const mlPerPart = mixedMassG / (mixRatio.resinParts * mixRatio.resinDensityGPerMl + mixRatio.hardenerParts * mixRatio.hardenerDensityGPerMl)
  const resinMl = mlPerPart * mixRatio.resinParts
  const hardenerMl = mlPerPart * mixRatio.hardenerParts
  return { clothMassG, mixedMassG, basis: 'volume', resinG: resinMl * mixRatio.resinDensityGPerMl, hardenerG: hardenerMl * mixRatio.hardenerDensityGPerMl, resinMl, hardenerMl }
}

// ─── Coupon bursts: calibrating the estimate ────────────────────────────────────────────────────
// Builders burst short tubes (coupons) laid up like a vessel to learn what their laminate holds. The
// ratio of each coupon's measured burst to its estimate, over a layup family, calibrates the estimate
// for vessels of that family. The calibrated figure informs; only a witnessed proof test rates a vessel.

/** The fibre volume fraction assumed for a hand layup when none is measured, 0.35 (common practice for wet hand layup). */
export const DEFAULT_HAND_LAYUP_FIBRE_VOLUME_FRACTION = 0.35

/** A layup: what a vessel's laminate and a coupon share. `fibreClass` may name a hybrid, which the estimate refuses. */
export interface Layup {
  fibreClass: string
  arealWeightGPerM2: number
  weave: Weave
  plies: number
}

/**
 * The estimated burst of a layup from the fibre class's generic properties (FIBRE_PROPERTIES): the
 * laminate burst estimate with that class's strength and density, on `layupDiameterMm`, at
 * `fibreVolumeFraction` (0.35 when not measured) and the club's `processFactor`. A hybrid of several
 * fibres has no single strength, so it is refused.
 */
export function layupBurstEstimate(layup: Layup & { layupDiameterMm: number, fibreVolumeFraction?: number, processFactor?: number }): LaminateBurstEstimate {
  if (!(FIBRE_CLASSES as readonly string[]).includes(layup.fibreClass)) {
    throw new VesselArithmeticError('fibreClass', layup.fibreClass === 'hybrid'
      ? 'A hybrid of several fibres has no single fibre strength to estimate from.'
      : `Unknown fibre class ${String(layup.fibreClass)}.`)
  }
  const fibre = FIBRE_PROPERTIES[layup.fibreClass as FibreClass]
  return laminateBurstEstimate({
    plies: layup.plies,
    arealWeightGPerM2: layup.arealWeightGPerM2,
    fibreDensityGPerCm3: fibre.densityGPerCm3,
    fibreStrengthMPa: fibre.strengthMPa,
    fibreVolumeFraction: layup.fibreVolumeFraction ?? DEFAULT_HAND_LAYUP_FIBRE_VOLUME_FRACTION,
    weave: layup.weave,
    processFactor: layup.processFactor,
    layupDiameterMm: layup.layupDiameterMm,
  })
}

/** A calibration factor: the median of measured ÷ estimated burst over a family's coupons, with how many and their spread. */
export interface CalibrationFactor {
  median: number
  count: number
  min: number
  max: number
}

/**
 * The calibration factor of a family from its coupons' ratios of measured ÷ estimated burst: the
 * median (of an even count, the mean of the middle two), the count, the smallest and the largest.
 * The median, not the mean, so one odd coupon (a bad end fitting, a dry spot) moves it little.
 * Refuses no ratios, and any ratio that is not a finite number above 0.
 */
export function calibrationFactor(ratios: readonly number[]): CalibrationFactor {
  if (!Array.isArray(ratios) || ratios.length === 0) throw new VesselArithmeticError('ratios', 'A calibration factor needs at least one coupon.')
  ratios.forEach((r, i) => positive(r, `ratios.${i}`, `The ratio of coupon ${i + 1}`))
  const sorted = [...ratios].sort((a, b) => a - b)
  const mid = Math.floor(sorted.length / 2)
  const median = sorted.length % 2 === 1 ? sorted[mid]! : (sorted[mid - 1]! + sorted[mid]!) / 2
  return { median, count: sorted.length, min: sorted[0]!, max: sorted[sorted.length - 1]! }
}

/** A layup family: fibre class, fabric areal weight, weave and resin (named case-insensitively, trimmed). */
export interface LayupFamily {
  fibreClass: string
  arealWeightGPerM2: number
  weave: Weave
  /** The resin as compared: trimmed and lower-cased. */
  resinKey: string
}

/** The resin as families compare it: trimmed, inner runs of spaces made one, lower-cased. */
export function resinKey(resin: string): string {
  if (typeof resin !== 'string' || resin.trim() === '') throw new VesselArithmeticError('resin', 'Name the resin: a family is told apart by it.')
  return resin.trim().replace(/\s+/g, ' ').toLowerCase()
}

/**
 * The key of a layup's family, `fibre:areal weight:weave:resin` (e.g. `e_glass:300:woven_0_90:laminating
 * epoxy`): coupons and vessels with the same key belong together. The plies and the diameter do not
 * count: the estimate already scales with them, and the factor corrects what it leaves out.
 */
export function layupFamilyKey(layup: { fibreClass: string, arealWeightGPerM2: number, weave: Weave, resin: string }): string {
  positive(layup.arealWeightGPerM2, 'arealWeightGPerM2', 'The fabric areal weight (g/m²)')
  return `${layup.fibreClass}:${layup.arealWeightGPerM2}:${layup.weave}:${resinKey(layup.resin)}`
}

/** A family key back into its parts, or null when it is not one (the resin may itself contain a colon). */
export function parseLayupFamilyKey(key: string): LayupFamily | null {
  const [fibreClass, weight, weave, ...rest] = String(key).split(':')
  const arealWeightGPerM2 = Number(weight)
  const resin = rest.join(':')
  if (!fibreClass || !weave || !(weave in WEAVE_FACTORS) || !Number.isFinite(arealWeightGPerM2) || arealWeightGPerM2 <= 0 || resin.trim() === '') return null
  return { fibreClass, arealWeightGPerM2, weave: weave as Weave, resinKey: resinKey(resin) }
}
