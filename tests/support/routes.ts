// The API's routes, discovered from the method-suffixed files under server/api.
import { existsSync, readdirSync, statSync } from 'node:fs'
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

/**
 * The concrete path for a route pattern: every parameter (`[id]`, `[token]`, `[...slug]` …, at any
 * depth) filled from `values` by its name; a bare string fills `[id]`. A parameter without a value throws,
 * so a route with a new kind of parameter fails its test until the test says what to put there.
 */
export function concretePath(pattern: string, values: string | Record<string, string>): string {
  const byName = typeof values === 'string' ? { id: values } : values
  return pattern.replace(/\[(?:\.\.\.)?([^\]]+)\]/g, (_, name: string) => {
    const value = byName[name]
    if (value === undefined) throw new Error(`${pattern}: no value for the route parameter [${name}]`)
    return encodeURIComponent(value)
  })
}

/** The route parameters' names in a pattern, e.g. `/api/a/[id]/b/[token]` → ['id', 'token']. */
export function routeParams(pattern: string): string[] {
  return [...pattern.matchAll(/\[(?:\.\.\.)?([^\]]+)\]/g)].map(m => m[1]!)
}

/** The handler file of a route "METHOD /api/path" (index files included). */
export function routeFile(route: string): string {
  const [method, path] = route.split(' ') as [string, string]
  const rel = path.replace(/^\/api\/?/, '')
  const base = join(ROOT, 'server/api')
  const candidates = [`${rel}.${method.toLowerCase()}.ts`, `${rel ? `${rel}/` : ''}index.${method.toLowerCase()}.ts`].map(f => join(base, f))
  const found = candidates.find(f => existsSync(f))
  if (!found) throw new Error(`no handler file for ${route}`)
  return found
}
