import { z } from 'zod'

/**
 * The club's policy document (clubs.policy, JSONB), validated on the way in and read with defaults.
 * Later issues add their settings here (tiers, proof margin, standoff rule …).
 */
export const ClubPolicySchema = z.object({
  /** The highest pressure tier a junior (under 18) may hold. */
  juniorTierCap: z.enum(['T0', 'T1', 'T2']).default('T1'),
}).passthrough()
export type ClubPolicy = z.infer<typeof ClubPolicySchema>

/** A front-door text: trimmed, at most `max` characters, printable (line breaks allowed). */
const frontDoorText = (max: number) => z.string({ invalid_type_error: 'Text, please' }).trim()
  .max(max, `At most ${max} characters`)
  // Control and format characters (bidirectional overrides …) other than line breaks have no place on a public page.
  .refine(v => !/[\p{Cc}\p{Cf}]/u.test(v.replace(/[\r\n\t]/g, '')), 'Use visible characters only')

/** The front door's length limits (the migration's checks say the same). */
export const FRONT_DOOR_LIMITS = { name: 120, description: 600, meetsWhere: 200, meetsWhen: 200, joiningNote: 400 } as const

/** The sections of the public page the admin switches on and off, in the page's order. */
export const FRONT_DOOR_SECTIONS = ['meetings', 'joining', 'dues', 'training', 'events', 'calculator', 'passCheck'] as const
export type FrontDoorSection = typeof FRONT_DOOR_SECTIONS[number]

/** The admin's front-door settings: the club's name, the public texts and which sections show. */
export const FrontDoorSchema = z.object({
  name: frontDoorText(FRONT_DOOR_LIMITS.name).pipe(z.string().min(1, 'The club needs a name').regex(/^[^\r\n\t]*$/, 'One line, please')),
  description: frontDoorText(FRONT_DOOR_LIMITS.description),
  meetsWhere: frontDoorText(FRONT_DOOR_LIMITS.meetsWhere),
  meetsWhen: frontDoorText(FRONT_DOOR_LIMITS.meetsWhen),
  joiningNote: frontDoorText(FRONT_DOOR_LIMITS.joiningNote),
  show: z.object(Object.fromEntries(FRONT_DOOR_SECTIONS.map(s => [s, z.boolean({ invalid_type_error: 'Yes or no' })])) as Record<FrontDoorSection, z.ZodBoolean>).strict(),
}).strict()
export type FrontDoor = z.infer<typeof FrontDoorSchema>
