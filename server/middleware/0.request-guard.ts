/**
 * Runs before every handler: refuses state-changing requests from other sites (403) and with a body
 * that is not of the route's media types (415), then reads any body itself, counting bytes as they
 * stream in and stopping at the route's limit (413, and the connection closes), so no handler ever
 * meets an unbounded body. The rules per route are in server/utils/request-rules.ts.
 */
export default defineEventHandler(async (event) => {
  const req = event.node.req
  const method = event.method.toUpperCase()
  const path = event.path.split('?')[0]!
  const rule = requestRuleFor(method, path)

  if (path.startsWith('/api/')) setResponseHeader(event, 'cache-control', 'no-store')
  const publicOrigin = originOf(String(useRuntimeConfig(event).publicUrl ?? ''))
  if (publicOrigin?.startsWith('https:')) setResponseHeader(event, 'strict-transport-security', 'max-age=31536000; includeSubDomains')

  if (STATE_CHANGING_METHODS.has(method)) {
    if (!rule.crossSite && comesFromAnotherSite(req.headers, publicOrigin)) {
      throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Requests from other sites are not accepted here' })
    }
    const type = mediaTypeOf(req.headers['content-type'])
    // A body-less request without a Content-Type (sign-out, "run now") needs none.
    if ((type || announcesBody(req.headers)) && !rule.mediaTypes.includes(type)) {
      throw createError({ statusCode: 415, statusMessage: 'Unsupported Media Type', message: `The body must be ${rule.mediaTypes.join(' or ')}` })
    }
  }

  if (!announcesBody(req.headers)) return
  if (Number(req.headers['content-length'] ?? 0) > rule.maxBytes) refuseTooLarge(event, rule.maxBytes)
  // Internal requests (server-side rendering's fetches) carry their body already.
  const nodeReq = req as typeof req & { rawBody?: unknown, body?: unknown }
  if (rule.streamed || nodeReq.rawBody !== undefined || nodeReq.body !== undefined) return
  try {
    // h3's readRawBody (and so readBody, validBody) takes a body already read from here.
    nodeReq.rawBody = await readBoundedBody(req, rule.maxBytes)
  }
  catch (error) {
    if (error instanceof TooLargeError) refuseTooLarge(event, rule.maxBytes)
    throw error
  }
})
