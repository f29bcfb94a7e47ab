/**
 * Any /api/ address no route serves: a JSON 404, whatever the Accept header, instead of falling
 * through to the pages (which would send a signed-out caller to the sign-in page).
 */
export default defineEventHandler((event) => {
  setResponseStatus(event, 404, 'Not Found')
  return { error: true, statusCode: 404, statusMessage: 'Not Found', message: 'There is no such API address' }
})
