// The API's routes, discovered from the method-suffixed files under server/api.
import { readdirSync, statSync } from 'node:fs'
import { join, relative } from 'node:path'
import { ROOT } from '../../scripts/lib/config.mjs'

/** Every route as "METHOD /api/path" — `members/[id]/roles.put.ts` → `PUT /api/members/[id]/roles`. */
export function discoverRoutes(): string[] {
  const base = join(ROOT, 'server/api')
  const walk = (dir: string): string[] => readdirSync(dir).flatMap((name) => {
    const path = join(dir, name)
    return statSync(path).isDirectory() ? walk(path) : [path]
  })
  return walk(base).filter(f => f.endsWith('.ts')).map((file) => {
    const rel = relative(base, file).replace(/\.ts$/, '')
    const m = rel.match(/^(.*)\.(get|post|put|patch|delete)$/)
    if (!m) throw new Error(`${rel}: route files are method-suffixed (name.get.ts, name.post.ts …)`)
    const path = `/api/${m[1]}`.replace(/\/index$/, '')
    return `${m[2]!.toUpperCase()} ${path}`
  }).sort()
}

/** The concrete path for a route pattern, with `[id]` filled in. */
export function concretePath(pattern: string, id: string): string {
  return pattern.replace(/\[id\]/g, id)
}
