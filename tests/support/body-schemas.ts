// The body schema each write route reads, found in the route's own source, and bad values per field
// derived from that schema's shape, so the bad-input test needs no hand-kept list of routes or fields.
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import type { ZodTypeAny } from 'zod'
import { ROOT } from '../../scripts/lib/config.mjs'
import { routeFile } from './routes'

export interface BodySchemaRef {
  /** The export of shared/schemas the route's `validBody(event, …)` is built from. */
  name: string
  /** Its module under shared/schemas, e.g. 'auth'. */
  module: string
}

/** The argument text of the first `validBody(event, …)` call in `source`, or null. */
function validBodyArgument(source: string): string | null {
  const start = source.indexOf('validBody(')
  if (start < 0) return null
  let depth = 0
  for (let i = start + 'validBody'.length; i < source.length; i++) {
    if (source[i] === '(') depth++
    else if (source[i] === ')' && --depth === 0) return source.slice(start + 'validBody('.length, i).replace(/^\s*event\s*,/, '')
  }
  return null
}

/**
 * Which shared schema the route `METHOD /api/path` validates its body with: the schema named in
 * `validBody(event, X)`, or the one a local `const X = …` in the same file is built from. Null when
 * the route reads no body or its schema does not come from shared/schemas.
 */
export function bodySchemaRef(route: string): BodySchemaRef | null {
  const source = readFileSync(routeFile(route), 'utf8')
  const argument = validBodyArgument(source)
  if (argument === null) return null
  const imported = new Map<string, string>()
  for (const m of source.matchAll(/import\s*{([^}]*)}\s*from\s*'[^']*shared\/schemas\/([\w-]+)'/g)) {
    for (const name of m[1]!.split(',').map(n => n.trim().replace(/^type\s+/, '')).filter(Boolean)) imported.set(name, m[2]!)
  }
  const locals = new Map([...source.matchAll(/const\s+(\w+)\s*=\s*([^\n]+)/g)].map(m => [m[1]!, m[2]!]))
  const seen = new Set<string>()
  const queue: string[] = [...(argument.match(/[A-Za-z_$][\w$]*/g) ?? [])]
  while (queue.length) {
    const id = queue.shift()!
    if (seen.has(id)) continue
    seen.add(id)
    if (imported.has(id)) return { name: id, module: imported.get(id)! }
    queue.push(...(locals.get(id)?.match(/[A-Za-z_$][\w$]*/g) ?? []))
  }
  return null
}

/** Whether the route's handler reads a body at all (calls validBody). */
export function readsBody(route: string): boolean {
  return validBodyArgument(readFileSync(routeFile(route), 'utf8')) !== null
}

/**
 * The zod schema behind `ref`. A schema factory (such as the sign-up schema, which depends on the
 * club's date) is called with `today`.
 */
export async function loadBodySchema(ref: BodySchemaRef, today: string): Promise<ZodTypeAny> {
  const mod = await import(join(ROOT, 'shared/schemas', `${ref.module}.ts`)) as Record<string, unknown>
  const found = mod[ref.name]
  if (found === undefined) throw new Error(`shared/schemas/${ref.module} exports no ${ref.name}`)
  return (typeof found === 'function' ? (found as (d: string) => ZodTypeAny)(today) : found) as ZodTypeAny
}

/** Peels refinements, transforms, optional, nullable, default and pipes off a schema. */
export function unwrap(schema: ZodTypeAny): ZodTypeAny {
  for (;;) {
    const def = schema._def as Record<string, unknown> & { typeName: string }
    if (def.typeName === 'ZodEffects') schema = def.schema as ZodTypeAny
    else if (['ZodOptional', 'ZodNullable', 'ZodDefault', 'ZodCatch', 'ZodReadonly'].includes(def.typeName)) schema = def.innerType as ZodTypeAny
    else if (def.typeName === 'ZodPipeline') schema = def.in as ZodTypeAny
    else if (def.typeName === 'ZodBranded') schema = def.type as ZodTypeAny
    else return schema
  }
}

/** The fields of an object schema (after unwrapping), or null when it is not an object. */
export function fieldsOf(schema: ZodTypeAny): Record<string, ZodTypeAny> | null {
  const inner = unwrap(schema)
  return inner._def.typeName === 'ZodObject' ? (inner as unknown as { shape: Record<string, ZodTypeAny> }).shape : null
}

/** The longest string `schema` (a string, or a union with one) takes, if it says. */
function maxLength(schema: ZodTypeAny): number | undefined {
  const inner = unwrap(schema)
  if (inner._def.typeName === 'ZodUnion') {
    const limits = (inner._def.options as ZodTypeAny[]).map(maxLength).filter((n): n is number => n !== undefined)
    return limits.length ? Math.max(...limits) : undefined
  }
  if (inner._def.typeName !== 'ZodString') return undefined
  const checks = inner._def.checks as { kind: string, value?: number }[]
  return checks.find(c => c.kind === 'max' || c.kind === 'length')?.value
}

/** What kind of value a field takes, as the bad values are chosen for it. */
export type FieldKind = 'string' | 'number' | 'boolean' | 'choice' | 'array' | 'other'

export function kindOf(schema: ZodTypeAny): FieldKind {
  const inner = unwrap(schema)
  switch (inner._def.typeName) {
    case 'ZodString': return 'string'
    case 'ZodNumber': return 'number'
    case 'ZodBoolean': return 'boolean'
    case 'ZodLiteral': return typeof inner._def.value === 'boolean' ? 'boolean' : 'choice'
    case 'ZodEnum': case 'ZodNativeEnum': return 'choice'
    case 'ZodArray': return 'array'
    case 'ZodUnion': return (inner._def.options as ZodTypeAny[]).some(o => kindOf(o) === 'string') ? 'string' : 'other'
    default: return 'other'
  }
}

export interface BadValue {
  label: string
  value: unknown
  /** True when every schema of the field's kind must refuse it (a wrong type, extra nesting, over the limit). */
  mustRefuse: boolean
}

/**
 * Bad values for one field, from its schema: the wrong type, one character over its limit (or 2 000
 * characters when it names none), empty, and the value nested one level too deep. Arrays also get
 * one item too many and an item that is too long.
 */
export function badValuesFor(schema: ZodTypeAny): BadValue[] {
  const kind = kindOf(schema)
  const nested = { label: 'extra nesting', value: { nested: ['x'] }, mustRefuse: true }
  switch (kind) {
    case 'string': {
      const max = maxLength(schema)
      return [
        { label: 'wrong type (number)', value: 12345, mustRefuse: true },
        { label: max === undefined ? 'too long (2000, no limit named)' : `too long (${max + 1})`, value: 'x'.repeat((max ?? 1999) + 1), mustRefuse: true },
        { label: 'empty', value: '', mustRefuse: false },
        nested,
      ]
    }
    case 'number':
      return [{ label: 'wrong type (string)', value: '1', mustRefuse: true }, { label: 'fraction', value: 1.5, mustRefuse: false },
        { label: 'negative', value: -1, mustRefuse: false }, nested]
    case 'boolean':
      return [{ label: 'wrong type (string)', value: 'true', mustRefuse: true }, nested]
    case 'choice':
      return [{ label: 'not a choice', value: 'no-such-choice', mustRefuse: true }, { label: 'wrong type (number)', value: 12345, mustRefuse: true }, nested]
    case 'array': {
      const inner = unwrap(schema)
      const item = inner._def.type as ZodTypeAny
      const max = (inner._def.maxLength as { value: number } | null)?.value
      const itemMax = maxLength(item)
      return [
        { label: 'wrong type (string)', value: 'x', mustRefuse: true },
        { label: 'nested items', value: [['x']], mustRefuse: true },
        { label: max === undefined ? 'too many items (1000, no limit named)' : `too many items (${max + 1})`, value: Array.from({ length: (max ?? 999) + 1 }, (_, i) => `item_${i}`), mustRefuse: true },
        { label: 'an item too long', value: ['x'.repeat((itemMax ?? 1999) + 1)], mustRefuse: kindOf(item) === 'string' },
      ]
    }
    default:
      return [{ label: 'wrong type (number)', value: 12345, mustRefuse: false }, nested]
  }
}
