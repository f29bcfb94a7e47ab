import { IdParamSchema } from '#shared/schemas/common'
import { CourseEditSchema } from '#shared/schemas/training'
import { updateCourse } from '../../../services/training'

/** The safety officer (policy.edit) changes a course's name, description, validity, pass mark or practical sign-off; audited. */
export default defineEventHandler(async (event) => {
  const actor = await requirePermission(event, 'policy.edit')
  const input = await validBody(event, CourseEditSchema)
  const { id } = validParams(event, IdParamSchema)
  return updateCourse(actor, id, input)
})
