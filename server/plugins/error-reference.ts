/**
 * Every error answer passes here first: a 5xx or an ORM error leaves as one plain message with a
 * reference that the log line beside it carries with the detail (hideServerError).
 */
export default defineNitroPlugin((nitroApp) => {
  const handle = nitroApp.h3App.options.onError
  nitroApp.h3App.options.onError = (error, event) => handle?.(hideServerError(error, event), event)
})
