// Which built files the fill page's service worker keeps: the app's entry and the fill page with
// everything they import (scripts, styles, the font), the page's lazy parts (the QR scanner's
// decoder), the layout it is shown in, the icons and the web app manifest. Nothing else: no other
// page's code, and never a page's HTML with personal data (the shell is fetched by the worker itself).
export interface ManifestChunk { file: string, css?: string[], assets?: string[], imports?: string[], dynamicImports?: string[], isEntry?: boolean }
interface PrecacheEntry { url: string, revision: string | null, size: number }

let built: Record<string, ManifestChunk> | undefined

/** Keeps the client build's chunk graph (Nuxt's `build:manifest` hook) for the transform below. */
export function rememberClientManifest(manifest: Record<string, ManifestChunk>): void {
  built = manifest
}

/**
 * The files (relative to the build's assets folder) the chunks `roots` import, with their styles and
 * assets; below the roots in `lazy` dynamic imports are followed too (the page's own lazy parts), below
 * the others not (the entry's dynamic imports are every other page).
 */
export function filesNeeded(manifest: Record<string, ManifestChunk>, roots: string[], lazy: string[]): Set<string> {
  const files = new Set<string>()
  const seen = new Set<string>()
  const visit = (key: string, followDynamic: boolean) => {
    const chunk = manifest[key]
    if (!chunk || seen.has(`${key} ${followDynamic}`)) return
    seen.add(`${key} ${followDynamic}`)
    files.add(chunk.file)
    for (const f of [...chunk.css ?? [], ...chunk.assets ?? []]) files.add(f)
    for (const k of chunk.imports ?? []) visit(k, followDynamic)
    // The entry's dynamic imports are every page: followed only from the fill page's own chunks.
    if (followDynamic && !chunk.isEntry) for (const k of chunk.dynamicImports ?? []) visit(k, true)
  }
  for (const r of roots) visit(r, lazy.includes(r))
  return files
}

/** The roots of the fill page's graph in a client manifest: the app entry, the page, the default layout. */
export function fillPageRoots(manifest: Record<string, ManifestChunk>): { roots: string[], page: string } {
  const entry = Object.keys(manifest).filter(k => manifest[k]!.isEntry)
  const page = Object.keys(manifest).find(k => /pages\/events\/\[id\]\/fill\.vue$/.test(k))
  const layout = Object.keys(manifest).find(k => /layouts\/default\.vue$/.test(k))
  if (!page) throw new Error('fill page precache: the fill page is not in the client build')
  return { roots: [...entry, page, ...(layout ? [layout] : [])], page }
}

/** Workbox manifest transform: keeps only what the fill page needs. */
export async function fillPageManifestTransform(entries: PrecacheEntry[]): Promise<{ manifest: PrecacheEntry[], warnings: string[] }> {
  const manifest = built
  if (!manifest) throw new Error('fill page precache: the client build manifest is missing')
  const { roots, page } = fillPageRoots(manifest)
  // The page's own lazy parts (the QR decoder) are needed at the field; the entry's lazy pages are not.
  const needed = filesNeeded(manifest, roots, [page])
  // The font's Latin files are the ones the page's words use; the other scripts' subsets stay out.
  // The app manifest (_nuxt/builds/) tells the client its route rules: it boots offline only with it.
  const wanted = (url: string) => url.startsWith('_nuxt/') && !url.startsWith('_nuxt/builds/')
    ? needed.has(url.slice('_nuxt/'.length)) && (!url.endsWith('.woff2') || /-latin-\d/.test(url))
    : true
  const kept = entries.filter((e, i) => wanted(e.url) && entries.findIndex(o => o.url === e.url) === i)
  return { manifest: kept, warnings: [] }
}
