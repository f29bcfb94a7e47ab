import { z } from 'zod'
import { PageQuerySchema, isoDate } from './common'
import { VESSEL_CONSTRUCTIONS } from '../utils/vessel-arithmetic'
import { LAMINATED_CONSTRUCTIONS, VESSEL_FIBRE_CLASSES, VESSEL_STATES } from '../utils/vessel-states'

/** A positive number no larger than `max`, in the unit the field's name carries. */
const positiveUpTo = (max: number, what: string) =>
  z.number({ invalid_type_error: `${what} must be a number` }).finite().positive(`${what} must be more than 0`).max(max, `${what} is at most ${max}`)

/** One printable line of text (a vessel's name, a resin). */
const textLine = (max: number, required: string) => z.string().trim().min(1, required).max(max, `At most ${max} characters`)
  .refine(v => !/[\p{Cc}\p{Cf}\p{Zl}\p{Zp}]/u.test(v), 'Use one line of visible characters')

/**
 * A member registers one of their own vessels (the club assigns the tag). A laminate is given whole
 * — fibre class, areal weight, weave and plies together — and laid-up constructions must give one.
 */
export const VesselRegistrationSchema = z.object({
  name: textLine(80, 'Give the vessel a name'),
  construction: z.enum(VESSEL_CONSTRUCTIONS, { errorMap: () => ({ message: 'Choose a construction' }) }),
  volumeL: positiveUpTo(100, 'The volume (L)'),
  diameterMm: positiveUpTo(1000, 'The diameter (mm)'),
  lengthMm: positiveUpTo(10_000, 'The length (mm)').nullable().optional(),
  emptyMassG: positiveUpTo(100_000, 'The empty mass (g)').nullable().optional(),
  metalInPressurePath: z.boolean().default(false),
  fibreClass: z.enum(VESSEL_FIBRE_CLASSES, { errorMap: () => ({ message: 'Choose a fibre class' }) }).nullable().optional(),
  arealWeightGPerM2: positiveUpTo(5000, 'The areal weight (g/m²)').nullable().optional(),
  weave: z.enum(['woven_0_90', 'hoop_tow'], { errorMap: () => ({ message: 'Choose woven 0/90 cloth or hoop-wound tow' }) }).nullable().optional(),
  plies: z.number().int('Plies are a whole number').min(1, 'At least 1 ply').max(50, 'At most 50 plies').nullable().optional(),
  resin: textLine(80, 'Name the resin').nullable().optional(),
  lastLayupOn: isoDate.nullable().optional(),
}).superRefine((v, ctx) => {
  const laminate = { fibreClass: v.fibreClass, arealWeightGPerM2: v.arealWeightGPerM2, weave: v.weave, plies: v.plies }
  const given = Object.values(laminate).some(x => x != null)
  const laidUp = (LAMINATED_CONSTRUCTIONS as readonly string[]).includes(v.construction)
  if (given || laidUp) {
    for (const [field, value] of Object.entries(laminate)) {
      if (value == null) ctx.addIssue({ code: 'custom', path: [field], message: 'Describe the whole laminate: fibre, areal weight, weave and plies' })
    }
  }
  if (!given && !laidUp) {
    if (v.resin != null) ctx.addIssue({ code: 'custom', path: ['resin'], message: 'A resin belongs to a laminate' })
    if (v.lastLayupOn != null) ctx.addIssue({ code: 'custom', path: ['lastLayupOn'], message: 'A layup date belongs to a laminate' })
  }
})
export type VesselRegistration = z.infer<typeof VesselRegistrationSchema>

export const VESSEL_SORT_FIELDS = ['tag', 'name', 'owner', 'registered'] as const

/** The vessel list: members see their own; holders of vessels.read_all filter the club's. */
export const VesselListQuerySchema = PageQuerySchema.extend({
  q: z.string().trim().max(100, 'At most 100 characters').optional(),
  state: z.enum(VESSEL_STATES).optional(),
  construction: z.enum(VESSEL_CONSTRUCTIONS).optional(),
  owner: z.string().uuid('Not a valid id').transform(id => id.toLowerCase()).optional(),
  // "Proof lapsing in 30 days" (lapsing=1, absent otherwise): in service with a proof current through
  // the next 30 days, or already due. Kept as the URL's '1' so list views round-trip through the address.
  lapsing: z.enum(['1'], { errorMap: () => ({ message: 'Use lapsing=1 or leave it out' }) }).optional(),
  sort: z.enum(VESSEL_SORT_FIELDS).default('tag'),
  dir: z.enum(['asc', 'desc']).default('asc'),
})
export type VesselListQuery = z.infer<typeof VesselListQuerySchema>

/** A vessel's tag as pages address it (`/vessels/SRG-0042`); typed in lower case, it still finds the vessel. */
export const VesselTagParamSchema = z.object({
  tag: z.string().trim().toUpperCase().regex(/^[A-Z]{2,5}-\d{4,}$/, 'Not a vessel tag'),
})
export type VesselTagParam = z.infer<typeof VesselTagParamSchema>
