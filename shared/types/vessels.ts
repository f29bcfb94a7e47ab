import type { VesselConstruction, Weave } from '../utils/vessel-arithmetic'
import type { VesselFibreClass, VesselState } from '../utils/vessel-states'

/** Vessels in the club's registry. Plain objects the routes return, never model instances. */

export interface VesselListItemDto {
  id: string
  tag: string
  name: string
  construction: VesselConstruction
  state: VesselState
  volumeL: number
  diameterMm: number
  owner: { id: string, name: string }
  registeredAt: string
}

export interface VesselDto extends VesselListItemDto {
  lengthMm: number | null
  emptyMassG: number | null
  metalInPressurePath: boolean
  fibreClass: VesselFibreClass | null
  arealWeightGPerM2: number | null
  weave: Weave | null
  plies: number | null
  resin: string | null
  lastLayupOn: string | null
  updatedAt: string
}
