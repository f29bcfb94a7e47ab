import { describe, expect, it } from 'vitest'
import { setupBrowser, goTo, signedInPage } from '../support/browser'
import { makeEnrolment, makeMember, makeTrainingSession, ago, clubDay } from '../support/factories'
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

  it('an instructor enters a course taken elsewhere with a PDF certificate, then flags it; the member sees "Retraining required"', async () => {
    const instructor = await makeMember({ roles: ['instructor'], name: 'Iwan Assessor' })
    const member = await makeMember({ name: 'Cai Elsewhere' })
    const [course] = await sql<{ name: string }>('SELECT c.name FROM courses c JOIN memberships m ON m.club_id = c.club_id WHERE m.id = $1 AND c.code = $2', [member.memberId, 'respirator_fit'])
    // A small but whole PDF: the server judges the file by its first bytes (%PDF-).
    const pdf = Buffer.from('%PDF-1.4\n1 0 obj<</Type/Catalog/Pages 2 0 R>>endobj\n2 0 obj<</Type/Pages/Kids[]/Count 0>>endobj\ntrailer<</Root 1 0 R>>\n%%EOF\n')

    const page = await signedInPage(instructor.email, instructor.password)
    try {
      // Found through the search, as an instructor would.
      await goTo(page, '/training/members')
      await page.getByTestId('training-member-q').fill('Cai Elsewhere')
      await page.getByTestId('training-member-search').click()
      await page.getByTestId(`training-member-${member.memberId}`).click()
      await page.waitForURL(url => url.pathname === `/training/members/${member.memberId}`)
      await page.getByTestId('records-empty').waitFor()

      const form = page.getByTestId('elsewhere-form')
      // Without evidence the form says what is missing and sends nothing.
      await form.getByTestId('elsewhere-course').selectOption({ label: course!.name })
      await form.getByTestId('elsewhere-from').fill(clubDay(-9))
      await form.getByTestId('elsewhere-to').fill(clubDay(-8))
      await form.getByTestId('elsewhere-trainer').fill('Rhian Fitter, Harbour Safety Centre')
      await form.getByTestId('elsewhere-save').click()
      await expect.poll(() => form.getByTestId('error-evidenceIds').textContent()).toMatch(/Upload the certificate/)

      await form.getByTestId('elsewhere-file').setInputFiles({ name: 'fit-test.pdf', mimeType: 'application/pdf', buffer: pdf })
      await form.getByTestId('elsewhere-upload').click()
      await expect.poll(() => form.getByTestId('elsewhere-uploaded').textContent()).toMatch(/fit-test\.pdf/)
      await form.getByTestId('elsewhere-save').click()
      await expect.poll(() => form.getByTestId('form-ok').textContent()).toMatch(/entered for Cai Elsewhere, taken elsewhere/)

      const [record] = await sql<{ id: string, taken_elsewhere: boolean, trainer_name: string, trained_to: string }>(
        'SELECT id, taken_elsewhere, trainer_name, trained_to::text AS trained_to FROM training_records WHERE membership_id = $1', [member.memberId])
      expect(record).toMatchObject({ taken_elsewhere: true, trainer_name: 'Rhian Fitter, Harbour Safety Centre', trained_to: clubDay(-8) })
      const [evidence] = await sql<{ id: string, record_id: string }>('SELECT id, record_id FROM training_evidence WHERE membership_id = $1', [member.memberId])
      expect(evidence!.record_id).toBe(record!.id)

      // The record's evidence downloads as the PDF that was uploaded.
      const row = page.getByTestId(`record-${record!.id}`)
      const link = row.getByTestId(`evidence-${evidence!.id}`)
      await link.waitFor()
      expect(await link.getAttribute('href')).toBe(`/api/training/evidence/${evidence!.id}`)
      const download = await page.request.get(new URL(`/api/training/evidence/${evidence!.id}`, page.url()).href)
      expect(download.headers()['content-type']).toBe('application/pdf')
      expect(Buffer.from(await download.body()).equals(pdf)).toBe(true)

      // Flagging asks for a reason and asks again before it is sent.
      await row.getByTestId('record-flag').click()
      await row.getByTestId('flag-reason-changed_ppe').check()
      await row.getByTestId('flag-note').fill('New half-mask model issued')
      await row.getByTestId('flag-send').click()
      expect(await sql('SELECT 1 FROM training_records WHERE id = $1 AND retraining_reason IS NOT NULL', [record!.id])).toEqual([])
      await row.getByTestId('flag-confirm').click()
      await row.getByTestId('record-retraining').waitFor()
      expect(await row.textContent()).toMatch(/The PPE changed: New half-mask model issued/)
      expect(await row.getByTestId('record-flag').count()).toBe(0)
      const [flag] = await sql<{ retraining_reason: string, retraining_note: string }>('SELECT retraining_reason, retraining_note FROM training_records WHERE id = $1', [record!.id])
      expect(flag).toEqual({ retraining_reason: 'changed_ppe', retraining_note: 'New half-mask model issued' })
    }
    finally {
      await page.close()
    }

    const memberPage = await signedInPage(member.email, member.password)
    try {
      await goTo(memberPage, '/training')
      const standing = memberPage.getByTestId('course-respirator_fit').getByTestId('course-standing-retraining_required')
      await standing.waitFor()
      expect(await standing.textContent()).toBe('Retraining required')
      // The member's own records carry the same evidence link.
      expect(await memberPage.getByTestId('record-list').locator('a[href^="/api/training/evidence/"]').count()).toBe(1)
    }
    finally {
      await memberPage.close()
    }
  })
})
