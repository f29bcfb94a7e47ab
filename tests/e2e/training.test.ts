import { describe, expect, it } from 'vitest'
import { setupBrowser, goTo, signedInPage } from '../support/browser'
import { makeEnrolment, makeMember, makeTrainingSession, ago } from '../support/factories'
import { sql } from '../support/db'

await setupBrowser()

describe('training in the browser', () => {
  it('an instructor runs a composite handling session and issues its records; the member then sees the course current', async () => {
    const instructor = await makeMember({ roles: ['instructor'], name: 'Ione Trainer' })
    const [trainee, other] = await Promise.all([makeMember({ name: 'Aled Trainee' }), makeMember({ name: 'Bea Absent' })])
    // The session began an hour ago; both members enrolled before it started.
    const { sessionId } = await makeTrainingSession({ instructorId: instructor.memberId, course: 'composite_ppe', startsAt: ago('1 hour'), capacity: 4 })
    await makeEnrolment({ sessionId, memberId: trainee.memberId })
    await makeEnrolment({ sessionId, memberId: other.memberId })
    const upcoming = await makeTrainingSession({ instructorId: instructor.memberId, course: 'pressure_safety', capacity: 1 })

    const page = await signedInPage(instructor.email, instructor.password)
    try {
      await goTo(page, `/training/sessions/${sessionId}`)
      expect(await page.getByTestId('composite-caution').textContent()).toMatch(/sensitise skin/)
      const table = page.getByTestId('attendance-table')
      await table.waitFor()
      const rowOf = async (name: string) => {
        for (const i of [0, 1]) {
          const row = page.getByTestId(`attendance-row-${i}`)
          if ((await row.textContent())?.includes(name)) return row
        }
        throw new Error(`no row for ${name}`)
      }
      const present = await rowOf('Aled Trainee')
      await present.getByTestId('attendance-present').check()
      await present.getByTestId('attendance-score').fill('90')
      await present.getByTestId('attendance-practical').check()
      await page.getByTestId('attendance-save').click()
      await expect.poll(() => page.getByTestId('form-ok').first().textContent()).toMatch(/saved/)

      // Issuing asks first and says what it does.
      await page.getByTestId('issue-records').click()
      await page.getByTestId('issue-records-confirm').click()
      await page.getByTestId('session-issued').waitFor()
      expect(await page.getByText(/Issued 1 records: 1 passed/).count()).toBe(1)
      const records = await sql<{ result: string, trainer_name: string }>('SELECT result, trainer_name FROM training_records WHERE membership_id = $1', [trainee.memberId])
      expect(records).toEqual([{ result: 'pass', trainer_name: 'Ione Trainer' }])
      expect(await sql('SELECT 1 FROM training_records WHERE membership_id = $1', [other.memberId])).toEqual([])
    }
    finally {
      await page.close()
    }

    const memberPage = await signedInPage(trainee.email, trainee.password)
    try {
      await memberPage.getByTestId('nav-training').click()
      await memberPage.waitForURL(url => url.pathname === '/training')
      const course = memberPage.getByTestId('course-composite_ppe')
      await course.getByTestId('course-standing-current').waitFor()
      expect(await memberPage.getByTestId('course-pressure_safety').getByTestId('course-standing-never_taken').count()).toBe(1)
      // The same list fills the training section of "My standing".
      await goTo(memberPage, '/standing')
      await memberPage.getByTestId('standing-training').getByTestId('course-standing-current').waitFor()

      // Enrolling in an upcoming session from the sessions list.
      await goTo(memberPage, '/training/sessions')
      const card = memberPage.getByTestId(`session-${upcoming.sessionId}`)
      await card.getByTestId('session-enrol').click()
      await expect.poll(() => card.getByTestId('session-my-place').textContent()).toBe('Enrolled')
    }
    finally {
      await memberPage.close()
    }
  })
})
