import { VesselArithmeticError } from '#shared/utils/vessel-arithmetic'

/**
 * Runs a calculation of the shared vessel arithmetic; input it refuses (no air left, a pressure below
 * vacuum …) becomes 400 with the arithmetic's message under its field, never a 500.
 */
export function calculate<T>(compute: () => T): T {
  try {
    return compute()
  }
  catch (error) {
    if (!(error instanceof VesselArithmeticError)) throw error
    throw createError({
      statusCode: 400,
      statusMessage: 'Bad Request',
      message: error.message,
      data: { fields: { [error.field]: error.message } },
    })
  }
}
