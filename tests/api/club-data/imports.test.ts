import { randomUUID } from 'node:crypto'
import { existsSync, readdirSync } from 'node:fs'
import { resolve } from 'node:path'
import { describe, it, expect } from 'vitest'
import Papa from 'papaparse'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { makeMember } from '../../support/factories'
import { DEMO, testEnv } from '../../support/test-env'
import type { ImportJobDto } from '../../../shared/types/club-data'

/** Uploads `text` as a roster file and returns the new job. */
async function upload(text: string): Promise<ImportJobDto> {
  const form = new FormData()
  form.append('file', new Blob([text], { type: 'text/csv' }), 'roster.csv')
  const res = await api<ImportJobDto>('/api/imports', { method: 'POST', body: form, as: 'admin' })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  return res.body
}

/** The mapping of the test files' columns (as the page would send it after the server's guess). */
function mappingOf(job: ImportJobDto, dateFormat = 'dmy') {
  return { columns: { ...job.suggested }, dateFormat }
}

async function dryRun(job: ImportJobDto, dateFormat = 'dmy'): Promise<ImportJobDto> {
  const res = await api<ImportJobDto>(`/api/imports/${job.id}/dry-run`, { body: mappingOf(job, dateFormat), as: 'admin' })
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return res.body
}

/** Starts the import and follows its progress until it ends; returns every progress seen. */
async function runToEnd(id: string): Promise<ImportJobDto[]> {
  const started = await api<ImportJobDto>(`/api/imports/${id}/run`, { body: { confirm: true }, as: 'admin' })
  expect(started.status, JSON.stringify(started.body)).toBe(202)
  return followToEnd(id)
}

async function followToEnd(id: string): Promise<ImportJobDto[]> {
  const seen: ImportJobDto[] = []
  for (let i = 0; i < 200; i++) {
    const res = await api<ImportJobDto>(`/api/imports/${id}`, { as: 'admin' })
    expect(res.status).toBe(200)
    seen.push(res.body)
    if (['done', 'failed'].includes(res.body.status)) return seen
    await new Promise(r => setTimeout(r, 150))
  }
  throw new Error(`import ${id} did not end`)
}

const HEAD = 'Name;E-mail;Phone;Date of birth;Paid until;Roles;Guardian;Guardian e-mail;Course;Trained on;Trainer;Tier;Tier signed on;Tier assessor'

/** A roster in the usual spreadsheet export: byte-order mark, semicolons, quoted fields, Windows line endings. */
function roster(lines: string[]): string {
  return `\uFEFF${[HEAD, ...lines].join('\r\n')}\r\n`
}

const uploadsDir = () => testEnv.uploadsDir

describe('roster import', () => {
  const tag = randomUUID().slice(0, 8)
  const newA = `ann-${tag}@import.example`
  const newB = `bob-${tag}@import.example`
  const file = (existing: string) => roster([
    `"Lee; Ann";${newA};+44 20 7946 0001;14/02/1990;31/12/2027;Instructor;;;First aid;01/03/2025;Dee Fox;T1;02/03/2025;Dee Fox`,
    `Bob Hart;${newB};;"03/04/1985";;;;;;;;;;`,
    `Cy Updated;${existing};+44 20 7946 0003;;30/06/2028;Safety officer;;;;;;;;`,
    `Di Bad;di-${tag}@import.example;;31/02/1990;;;;;;;;;;`,
    `Me Admin;${DEMO.admin};;;31/12/2030;;;;;;;;;`,
    `Jo Junior;jo-${tag}@import.example;;01/01/2020;;;;;;;;;;`,
  ])

  it('dry run: counts what each row will do and writes nothing but staging rows', async () => {
    const existing = await makeMember({ roles: ['instructor'], paidThrough: '2026-01-31' })
    const job = await upload(file(existing.email))
    expect(job.headings[0]).toBe('Name') // the byte-order mark is not part of the first heading
    expect(job.preview[0]![0]).toBe('Lee; Ann') // a quoted field keeps its separator
    expect(job.suggested).toMatchObject({ name: 0, email: 1, phone: 2, birthDate: 3, paidThrough: 4, roles: 5, trainingCourse: 8, tierRank: 11 })
    const checked = await dryRun(job)
    expect(checked.status).toBe('checked')
    expect(checked.dryRun).toEqual({ total: 6, create: 2, update: 1, unchanged: 0, refused: 3 })
    const refused = checked.rows.filter(r => r.outcome === 'refused')
    expect(refused.map(r => [r.line, r.issues[0]!.field])).toEqual([[5, 'birthDate'], [6, 'email'], [7, 'guardianName']])
    expect(refused[1]!.issues[0]!.reason).toMatch(/your own membership/)
    const [users] = await sql<{ n: string }>('SELECT count(*) AS n FROM users WHERE lower(email) IN ($1, $2)', [newA, newB])
    expect(Number(users!.n)).toBe(0)
    await api(`/api/imports/${job.id}`, { method: 'DELETE', as: 'admin' })
  })

  it('refuses an ambiguous date unless the date format is chosen', async () => {
    const job = await upload(roster([`Ed Amb;ed-${tag}@import.example;;04/02/1990;;;;;;;;;;`]))
    const auto = await dryRun(job, 'auto')
    expect(auto.rows[0]).toMatchObject({ outcome: 'refused', issues: [{ field: 'birthDate', reason: expect.stringMatching(/Ambiguous/) }] })
    const chosen = await dryRun(job, 'mdy')
    expect(chosen.rows[0]).toMatchObject({ outcome: 'create', issues: [] })
    await api(`/api/imports/${job.id}`, { method: 'DELETE', as: 'admin' })
  })

  it('the refused rows download as CSV with a reason column, the cells as written', async () => {
    const existing = await makeMember()
    const job = await dryRun(await upload(file(existing.email)))
    const res = await fetch(new URL(`/api/imports/${job.id}/refused`, (await import('vitest')).inject('baseUrl')), {
      headers: { cookie: ((await import('vitest')).inject('cookies') as Record<string, string>).admin! },
    })
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toMatch(/^text\/csv/)
    const parsed = Papa.parse<string[]>(await res.text(), { skipEmptyLines: true })
    expect(parsed.errors).toEqual([])
    expect(parsed.data[0]).toEqual([...HEAD.split(';'), 'reason'])
    expect(parsed.data.slice(1).map(r => r[1])).toEqual([`di-${tag}@import.example`, DEMO.admin, `jo-${tag}@import.example`])
    expect(parsed.data[1]![3]).toBe('31/02/1990')
    expect(parsed.data[1]![14]).toMatch(/^Row 5: Birth date: Not a calendar date/)
    expect(parsed.data[3]![14]).toMatch(/Guardian name: Members under 18 name a parent or guardian/)
    await api(`/api/imports/${job.id}`, { method: 'DELETE', as: 'admin' })
  })

  it('imports: accounts without password and without e-mail, roles only added, records unconfirmed, audited; then deletes its file and rows', async () => {
    const existing = await makeMember({ roles: ['instructor'], paidThrough: '2026-01-31' })
    const [adminBefore] = await sql<{ roles: string[], paid_through: string }>(
      `SELECT m.roles, m.paid_through::text FROM memberships m JOIN users u ON u.id = m.user_id WHERE u.email = $1`, [DEMO.admin])
    const job = await dryRun(await upload(file(existing.email)))
    const seen = await runToEnd(job.id)
    const end = seen.at(-1)!
    expect(end.status).toBe('done')
    expect(end.progress).toMatchObject({ done: 6, total: 6, created: 2, updated: 1, unchanged: 0, refused: 3, secondsLeft: 0 })

    const created = await sql<{ email: string, password_hash: string | null, roles: string[], approved: boolean, paid_through: string | null, birth_date: string, phone: string | null }>(`
      SELECT u.email, u.password_hash, m.roles, m.approved_at IS NOT NULL AS approved, m.paid_through::text, m.birth_date::text, m.phone
      FROM users u JOIN memberships m ON m.user_id = u.id WHERE u.email IN ($1, $2) ORDER BY u.email`, [newA, newB])
    expect(created).toEqual([
      { email: newA, password_hash: null, roles: ['member', 'instructor'], approved: true, paid_through: '2027-12-31', birth_date: '1990-02-14', phone: '+44 20 7946 0001' },
      { email: newB, password_hash: null, roles: ['member'], approved: true, paid_through: null, birth_date: '1985-04-03', phone: null },
    ])
    const [updated] = await sql<{ roles: string[], paid_through: string }>('SELECT roles, paid_through::text FROM memberships WHERE id = $1', [existing.memberId])
    expect(updated).toEqual({ roles: ['member', 'instructor', 'safety_officer'], paid_through: '2028-06-30' })
    const [adminAfter] = await sql(`SELECT m.roles, m.paid_through::text FROM memberships m JOIN users u ON u.id = m.user_id WHERE u.email = $1`, [DEMO.admin])
    expect(adminAfter).toEqual(adminBefore)

    const records = await sql(`SELECT r.imported, r.confirmed_at, r.trainer_name, r.trained_to::text FROM training_records r
      JOIN memberships m ON m.id = r.membership_id JOIN users u ON u.id = m.user_id WHERE u.email = $1`, [newA])
    expect(records).toEqual([{ imported: true, confirmed_at: null, trainer_name: 'Dee Fox', trained_to: '2025-03-01' }])
    const tiers = await sql(`SELECT t.rank, t.imported, t.confirmed_at, t.imported_assessor_name FROM member_tiers t
      JOIN memberships m ON m.id = t.membership_id JOIN users u ON u.id = m.user_id WHERE u.email = $1`, [newA])
    expect(tiers).toEqual([{ rank: 1, imported: true, confirmed_at: null, imported_assessor_name: 'Dee Fox' }])

    const notices = await sql<{ n: string }>(`SELECT count(*) AS n FROM notices n JOIN memberships m ON m.id = n.membership_id
      JOIN users u ON u.id = m.user_id WHERE u.email IN ($1, $2)`, [newA, newB])
    expect(Number(notices[0]!.n)).toBe(0)

    // One event per member whose roles or paid-through the import set (Ann: roles and paid-through; the
    // existing member: a role added and paid-through moved; Bob: neither), and one for the import.
    const events = await sql<{ action: string, subject_id: string, after: Record<string, unknown> }>(
      `SELECT action, subject_id, after FROM audit_events WHERE action IN ('member.imported', 'club_data.import') AND created_at >= now() - interval '5 minutes'
       AND (subject_id::text = $1 OR subject_id IN (SELECT m.id FROM memberships m JOIN users u ON u.id = m.user_id WHERE u.email IN ($2, $3, $4)))`,
      [job.id, newA, newB, existing.email])
    expect(events.filter(e => e.action === 'member.imported')).toHaveLength(2)
    expect(events.find(e => e.action === 'club_data.import')!.after).toMatchObject({ outcome: 'done', rows: 6, created: 2, updated: 1, refused: 3 })

    const [rows] = await sql<{ n: string }>('SELECT count(*) AS n FROM import_rows WHERE job_id = $1', [job.id])
    expect(Number(rows!.n)).toBe(0)
    expect(existsSync(resolve(uploadsDir(), `import-${job.id}.csv`))).toBe(false)
  })

  it('is idempotent: the same file a second time changes nothing', async () => {
    const existing = await makeMember({ roles: ['instructor'], paidThrough: '2026-01-31' })
    const text = file(existing.email).replace(new RegExp(tag, 'g'), `${tag}x`)
    const snapshot = () => sql(`
      SELECT u.email, u.name, u.password_hash, u.updated_at, m.roles, m.paid_through, m.phone, m.birth_date, m.updated_at AS m_updated,
        (SELECT count(*) FROM training_records r WHERE r.membership_id = m.id) AS records,
        (SELECT count(*) FROM member_tiers t WHERE t.membership_id = m.id) AS tiers
      FROM users u JOIN memberships m ON m.user_id = u.id WHERE u.email LIKE $1 OR u.email = $2 ORDER BY u.email`, [`%-${tag}x@import.example`, existing.email])
    const first = await dryRun(await upload(text))
    expect((await runToEnd(first.id)).at(-1)!.progress).toMatchObject({ created: 2, updated: 1 })
    const before = await snapshot()
    const again = await dryRun(await upload(text))
    expect(again.dryRun).toEqual({ total: 6, create: 0, update: 0, unchanged: 3, refused: 3 })
    expect((await runToEnd(again.id)).at(-1)!.progress).toMatchObject({ done: 6, created: 0, updated: 0, unchanged: 3, refused: 3 })
    expect(await snapshot()).toEqual(before)
  })

  it('reports progress while it runs, rows done of total, and keeps it for a reload', async () => {
    const t = randomUUID().slice(0, 6)
    const lines = Array.from({ length: 700 }, (_, i) => `Member ${i} Prog;p${i}-${t}@import.example;;;;;;;;;;;;`)
    const job = await dryRun(await upload(roster(lines)))
    expect(job.dryRun).toMatchObject({ total: 700, create: 700 })
    const seen = await runToEnd(job.id)
    const done = seen.map(s => s.progress.done)
    expect(done).toEqual([...done].sort((a, b) => a - b)) // never goes back
    expect(seen.every(s => s.progress.total === 700)).toBe(true)
    expect(seen.at(-1)!.progress).toMatchObject({ done: 700, created: 700, refused: 0, secondsLeft: 0 })
    // A reload (a fresh request) finds the finished job as it was.
    const reload = await api<ImportJobDto>(`/api/imports/${job.id}`, { as: 'admin' })
    expect(reload.body.progress).toEqual(seen.at(-1)!.progress)
    expect(reload.body.finishedAt).not.toBeNull()
  })

  it('a job whose server stopped is carried on from its first row not done, once its lease has run out', async () => {
    const t = randomUUID().slice(0, 6)
    const lines = Array.from({ length: 10 }, (_, i) => `Member ${i} Lease;l${i}-${t}@import.example;;;;;;;;;;;;`)
    const job = await dryRun(await upload(roster(lines)))
    // Another server claimed the job and wrote rows 2–4 before it stopped (its writes: marked done).
    await sql(`UPDATE import_rows SET done = true WHERE job_id = $1 AND line <= 4`, [job.id])
    await sql(`UPDATE import_jobs SET status = 'running', claim_id = gen_random_uuid(), locked_until = now() + interval '1 hour',
      started_at = now(), rows_done = 3, created_count = 3 WHERE id = $1`, [job.id])
    // While its lease runs, nobody takes it over.
    await api(`/api/imports/${job.id}`, { as: 'admin' })
    await new Promise(r => setTimeout(r, 1000))
    const held = await api<ImportJobDto>(`/api/imports/${job.id}`, { as: 'admin' })
    expect(held.body).toMatchObject({ status: 'running', progress: { done: 3 } })
    // The lease runs out: the next request for the job carries it on.
    await sql(`UPDATE import_jobs SET locked_until = now() - interval '1 second' WHERE id = $1`, [job.id])
    const end = (await followToEnd(job.id)).at(-1)!
    expect(end).toMatchObject({ status: 'done', progress: { done: 10, total: 10, created: 10 } })
    const made = await sql<{ email: string }>('SELECT email FROM users WHERE email LIKE $1 ORDER BY email', [`%-${t}@import.example`])
    // Rows 2–4 (members 0–2) were the stopped server's: not written again here.
    expect(made.map(m => m.email)).toEqual(Array.from({ length: 7 }, (_, i) => `l${i + 3}-${t}@import.example`))
  })

  it('rows of one member in one batch make one member and one audit event, as if written one after another', async () => {
    const t = randomUUID().slice(0, 6)
    const twice = `twice-${t}@import.example`
    const existing = await makeMember({ roles: ['instructor'], paidThrough: '2026-01-31' })
    const job = await dryRun(await upload(roster([
      `Tam Twice;${twice};;;;Instructor;;;First aid;01/03/2025;Dee Fox;;;`,
      `Tam Twice;${twice};+44 20 7946 0101;;31/12/2027;;;;First aid;01/03/2025;Dee Fox;T1;02/03/2025;Dee Fox`,
      `Cy Twice;${existing.email};;;;Safety officer;;;;;;;;`,
      `Cy Twice;${existing.email};+44 20 7946 0102;;30/06/2028;Instructor;;;;;;;;`,
      `Cy Twice;${existing.email};;;30/06/2027;;;;;;;;;`,
    ])))
    expect(job.dryRun).toEqual({ total: 5, create: 1, update: 3, unchanged: 1, refused: 0 })
    const end = (await runToEnd(job.id)).at(-1)!
    expect(end.progress).toMatchObject({ done: 5, created: 1, updated: 3, unchanged: 1, refused: 0 })

    const members = await sql<{ email: string, id: string, roles: string[], paid_through: string, phone: string, records: string, tiers: string }>(`
      SELECT u.email, m.id, m.roles, m.paid_through::text, m.phone,
        (SELECT count(*) FROM training_records r WHERE r.membership_id = m.id) AS records,
        (SELECT count(*) FROM member_tiers r WHERE r.membership_id = m.id) AS tiers
      FROM users u JOIN memberships m ON m.user_id = u.id WHERE u.email IN ($1, $2) ORDER BY u.email`, [existing.email, twice])
    const byEmail = Object.fromEntries(members.map(m => [m.email, m]))
    expect(byEmail[twice]).toMatchObject({ roles: ['member', 'instructor'], paid_through: '2027-12-31', phone: '+44 20 7946 0101', records: '1', tiers: '1' })
    // Paid-through never moves back (the third row's earlier date is ignored), roles are only added.
    expect(byEmail[existing.email]).toMatchObject({ roles: ['member', 'instructor', 'safety_officer'], paid_through: '2028-06-30', phone: '+44 20 7946 0102' })

    const events = await sql<{ subject_id: string, before: Record<string, unknown> | null, after: Record<string, unknown> }>(
      `SELECT subject_id, before, after FROM audit_events WHERE action = 'member.imported' AND subject_id IN ($1, $2)`,
      [byEmail[twice]!.id, byEmail[existing.email]!.id])
    expect(events).toHaveLength(2)
    expect(events.find(e => e.subject_id === byEmail[twice]!.id)).toMatchObject({ before: null, after: { roles: ['member', 'instructor'], paidThrough: '2027-12-31' } })
    expect(events.find(e => e.subject_id === byEmail[existing.email]!.id)).toMatchObject({
      before: { roles: ['member', 'instructor'], paidThrough: '2026-01-31' },
      after: { roles: ['member', 'instructor', 'safety_officer'], paidThrough: '2028-06-30' },
    })
  })

  it('a batch the database refuses is written again row by row: the refused row counted, the others written', async () => {
    const t = randomUUID().slice(0, 6)
    const lines = Array.from({ length: 6 }, (_, i) => `Member ${i} Retry;r${i}-${t}@import.example;;;31/12/2027;;;;;;;;;`)
    const job = await dryRun(await upload(roster(lines)))
    expect(job.dryRun).toMatchObject({ total: 6, create: 6 })
    // A value the dry run could not have let through stands in for a rule only the database knows.
    await sql(`UPDATE import_rows SET row_values = jsonb_set(row_values, '{paidThrough}', '"2027-02-31"') WHERE job_id = $1 AND line = 4`, [job.id])
    const end = (await runToEnd(job.id)).at(-1)!
    expect(end).toMatchObject({ status: 'done', progress: { done: 6, created: 5, refused: 1 } })
    const made = await sql<{ email: string }>('SELECT email FROM users WHERE email LIKE $1 ORDER BY email', [`%-${t}@import.example`])
    // The refused row's account went back with its savepoint: no account without a membership is left.
    expect(made.map(m => m.email)).toEqual([0, 1, 3, 4, 5].map(i => `r${i}-${t}@import.example`))
  })

  it('refuses a file that is not UTF-8 text', async () => {
    const form = new FormData()
    form.append('file', new Blob([new Uint8Array([0x89, 0x50, 0x4E, 0x47, 0, 0, 0, 0])]), 'x.csv')
    const res = await api('/api/imports', { method: 'POST', body: form, as: 'admin' })
    expect(res.status).toBe(422)
    expect(readdirSync(uploadsDir()).filter(f => f.startsWith('.incoming-'))).toEqual([])
  })
})
