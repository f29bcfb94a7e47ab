import { existsSync, readdirSync, readFileSync, rmSync } from 'node:fs'
import { request } from 'node:http'
import { dirname, join } from 'node:path'
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startAppServer } from '../../../scripts/lib/processes.mjs'
import { LOCAL, ROOT, TEST } from '../../../scripts/lib/config.mjs'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { clubDay, makeClub, makeMember, makePhoto, makeProofTest, type MadeMember } from '../../support/factories'
import { signIn } from '../../support/global-setup'
import { serverEnv } from '../../support/test-env'
import type { PhotoDto } from '../../../shared/types/photos'
import type { VesselDto } from '../../../shared/types/vessels'

// A server of this file's own, with an uploads folder of its own: its memory is measured while a large
// upload streams in, and what lands in the folder is this file's alone.
const PORT = TEST.spareBase + 4
const BASE = `http://127.0.0.1:${PORT}`
const UPLOADS = join(LOCAL, 'test', 'uploads-photos-test')
let server: Awaited<ReturnType<typeof startAppServer>> | undefined

type Member = MadeMember & { cookie: string }
let owner: Member
let other: Member
let instructor: Member
let safety: Member
let outsider: Member
let vessel: VesselDto

async function member(o: Parameters<typeof makeMember>[0] = {}): Promise<Member> {
  const m = await makeMember(o)
  return { ...m, cookie: await signIn(BASE, m.email, m.password) }
}

/** A JPEG of `width`×`height` turned by EXIF orientation 6, carrying a copyright marker and a GPS position. */
async function jpegWithGps(width = 800, height = 600): Promise<Buffer> {
  return sharp({ create: { width, height, channels: 3, background: { r: 40, g: 90, b: 160 } } })
    .jpeg()
    .withMetadata({ orientation: 6 })
    .withExif({ IFD0: { Copyright: 'field-marker-7731' }, IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '51/1 30/1 0/1', GPSLongitudeRef: 'W', GPSLongitude: '0/1 7/1 0/1' } })
    .toBuffer()
}

function form(fields: Record<string, string>, file?: { bytes: Buffer, name: string, type?: string }): FormData {
  const f = new FormData()
  for (const [k, v] of Object.entries(fields)) f.append(k, v)
  if (file) f.append('file', new Blob([new Uint8Array(file.bytes)], { type: file.type ?? 'image/jpeg' }), file.name)
  return f
}

type Answer = PhotoDto & { message: string, data?: { fields?: Record<string, string> } }
const upload = (as: string, body: FormData) => api<Answer>('/api/photos', { baseUrl: BASE, as, body })
const fetchPhoto = (as: string | undefined, path: string) => fetch(`${BASE}${path}`, { headers: as ? { cookie: as } : {} })

/** Every file in the uploads folder (none are expected elsewhere). */
const storedFiles = () => (existsSync(UPLOADS) ? readdirSync(UPLOADS).sort() : [])

beforeAll(async () => {
  rmSync(UPLOADS, { recursive: true, force: true })
  server = await startAppServer({ root: ROOT, port: PORT, env: serverEnv({ NUXT_PUBLIC_URL: BASE, NUXT_UPLOADS_DIR: UPLOADS }) })
  ;[owner, other, instructor, safety] = await Promise.all([member(), member(), member({ roles: ['instructor'] }), member({ roles: ['safety_officer'] })])
  const club = await makeClub({ name: 'Photo Test Club', tagPrefix: 'PHT' })
  outsider = await member({ clubId: club.id })
  const res = await api<VesselDto>('/api/vessels', { baseUrl: BASE, as: owner.cookie, body: { name: 'Photo Bottle', construction: 'single_bottle', volumeL: 2, diameterMm: 102 } })
  expect(res.status).toBe(201)
  vessel = res.body
})

afterAll(async () => {
  await server?.stop()
})

describe('POST /api/photos: a build photo is re-encoded without metadata, with a thumbnail', () => {
  let photo: PhotoDto

  it('keeps the image upright and strips EXIF and GPS from the image and its thumbnail', async () => {
    const original = await jpegWithGps()
    expect((await sharp(original).metadata()).exif).toBeDefined()
    expect(original.includes('field-marker-7731')).toBe(true)

    const res = await upload(owner.cookie, form({ purpose: 'build', vesselId: vessel.id, caption: 'First layer of cloth' }, { bytes: original, name: 'IMG_0001.jpg' }))
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    photo = res.body
    // Orientation 6 means a quarter turn: 800×600 as stored bytes, shown 600×800.
    expect(photo).toMatchObject({ purpose: 'build', vesselId: vessel.id, contentType: 'image/jpeg', width: 600, height: 800, caption: 'First layer of cloth' })
    expect(photo.url).toBe(`/api/photos/${photo.id}`)
    expect(photo.thumbnailUrl).toBe(`/api/photos/${photo.id}/thumbnail`)

    expect(storedFiles()).toEqual([`${photo.id}-thumb.jpg`, `${photo.id}.jpg`].sort())
    const stored = readFileSync(join(UPLOADS, `${photo.id}.jpg`))
    const thumb = readFileSync(join(UPLOADS, `${photo.id}-thumb.jpg`))
    for (const bytes of [stored, thumb]) {
      const meta = await sharp(bytes).metadata()
      expect(meta.exif).toBeUndefined()
      expect(meta.icc).toBeUndefined()
      expect(meta.xmp).toBeUndefined()
      expect(meta.orientation).toBeUndefined()
      expect(bytes.includes('field-marker-7731')).toBe(false)
      expect(bytes.includes('Exif\u0000\u0000')).toBe(false)
    }
    expect(stored.length).toBe(photo.byteSize)
    const thumbMeta = await sharp(thumb).metadata()
    expect(thumbMeta.width).toBe(320)
    expect(thumb.length).toBeLessThan(stored.length)
    const [row] = await sql<{ uploaded_by_membership_id: string, byte_size: number }>('SELECT uploaded_by_membership_id, byte_size FROM photos WHERE id = $1', [photo.id])
    expect(row).toEqual({ uploaded_by_membership_id: owner.memberId, byte_size: stored.length })
  })

  it('keeps PNG and WebP in their own format', async () => {
    for (const [format, type, ext] of [['png', 'image/png', 'png'], ['webp', 'image/webp', 'webp']] as const) {
      const bytes = await sharp({ create: { width: 400, height: 300, channels: 3, background: '#884422' } }).toFormat(format).toBuffer()
      const res = await upload(owner.cookie, form({ purpose: 'build', vesselId: vessel.id }, { bytes, name: `layup.${ext}`, type }))
      expect(res.status).toBe(201)
      expect(res.body).toMatchObject({ contentType: type, width: 400, height: 300 })
      expect((await sharp(readFileSync(join(UPLOADS, `${res.body.id}.${ext}`))).metadata()).format).toBe(format)
    }
  })

  it('serves the image and thumbnail with their type, inline under the id, nosniff and a private cache', async () => {
    for (const [path, name] of [[photo.url, `${photo.id}.jpg`], [photo.thumbnailUrl, `${photo.id}-thumb.jpg`]] as const) {
      const res = await fetchPhoto(owner.cookie, path)
      expect(res.status).toBe(200)
      expect(res.headers.get('content-type')).toBe('image/jpeg')
      expect(res.headers.get('content-disposition')).toBe(`inline; filename="${name}"`)
      expect(res.headers.get('x-content-type-options')).toBe('nosniff')
      expect(res.headers.get('cache-control')).toMatch(/^private/)
      expect(Buffer.from(await res.arrayBuffer()).equals(readFileSync(join(UPLOADS, name)))).toBe(true)
    }
  })

  it('shows the photo to the owner and to officers with vessels.read_all, never to another member or another club', async () => {
    expect((await fetchPhoto(undefined, photo.url)).status).toBe(401)
    expect((await fetchPhoto(other.cookie, photo.url)).status).toBe(404)
    expect((await fetchPhoto(other.cookie, photo.thumbnailUrl)).status).toBe(404)
    expect((await fetchPhoto(outsider.cookie, photo.url)).status).toBe(404)
    expect((await fetchPhoto(safety.cookie, photo.url)).status).toBe(200)
    expect((await fetchPhoto(instructor.cookie, photo.thumbnailUrl)).status).toBe(200)
  })

  it('lists a vessel\'s photos for whoever may see the vessel; 404 for another member', async () => {
    const mine = await api<PhotoDto[]>(`/api/vessels/${vessel.id}/photos`, { baseUrl: BASE, as: owner.cookie })
    expect(mine.status).toBe(200)
    expect(mine.body.map(p => p.id)).toContain(photo.id)
    expect(mine.body.every(p => p.vesselId === vessel.id)).toBe(true)
    expect((await api(`/api/vessels/${vessel.id}/photos`, { baseUrl: BASE, as: safety.cookie })).status).toBe(200)
    expect((await api(`/api/vessels/${vessel.id}/photos`, { baseUrl: BASE, as: other.cookie })).status).toBe(404)
  })
})

describe('POST /api/photos: what is refused', () => {
  it('refuses an executable renamed .jpg (judged from its content) and stores nothing', async () => {
    const before = storedFiles()
    const [{ count: rowsBefore }] = await sql<{ count: string }>('SELECT count(*) FROM photos WHERE uploaded_by_membership_id = $1', [owner.memberId]) as [{ count: string }]
    const elf = Buffer.concat([Buffer.from([0x7F, 0x45, 0x4C, 0x46, 0x02, 0x01, 0x01, 0x00]), Buffer.alloc(4096, 0x90)])
    const mz = Buffer.concat([Buffer.from('MZ'), Buffer.alloc(4096, 0x00)])
    for (const bytes of [elf, mz]) {
      const res = await upload(owner.cookie, form({ purpose: 'build', vesselId: vessel.id }, { bytes, name: 'holiday.jpg' }))
      expect(res.status).toBe(415)
      expect(res.body.message).toMatch(/JPEG, PNG or WebP/)
    }
    expect(storedFiles()).toEqual(before)
    const [{ count: rowsAfter }] = await sql<{ count: string }>('SELECT count(*) FROM photos WHERE uploaded_by_membership_id = $1', [owner.memberId]) as [{ count: string }]
    expect(rowsAfter).toBe(rowsBefore)
  })

  it('refuses a damaged JPEG (right first bytes, no image) with 422 and stores nothing', async () => {
    const before = storedFiles()
    const res = await upload(owner.cookie, form({ purpose: 'build', vesselId: vessel.id }, { bytes: Buffer.concat([Buffer.from([0xFF, 0xD8, 0xFF, 0xE0]), Buffer.alloc(2000, 7)]), name: 'x.jpg' }))
    expect(res.status).toBe(422)
    expect(storedFiles()).toEqual(before)
  })

  it('names the stored files by the id only: a file name with ../ cannot leave the folder', async () => {
    const res = await upload(owner.cookie, form({ purpose: 'build', vesselId: vessel.id }, { bytes: await jpegWithGps(300, 200), name: '../../escaped-7731.jpg' }))
    expect(res.status).toBe(201)
    expect(storedFiles()).toContain(`${res.body.id}.jpg`)
    expect(storedFiles().some(f => f.includes('escaped'))).toBe(false)
    for (const dir of [UPLOADS, dirname(UPLOADS), dirname(dirname(UPLOADS))]) expect(existsSync(join(dir, 'escaped-7731.jpg'))).toBe(false)
  })

  it('checks the fields: a purpose, a vessel for build and gauge photos, one file in "file"', async () => {
    const bytes = await jpegWithGps(200, 100)
    const cases: [FormData, string][] = [
      [form({ vesselId: vessel.id }, { bytes, name: 'a.jpg' }), 'purpose'],
      [form({ purpose: 'launch', vesselId: vessel.id }, { bytes, name: 'a.jpg' }), 'purpose'],
      [form({ purpose: 'build' }, { bytes, name: 'a.jpg' }), 'vesselId'],
      [form({ purpose: 'build', vesselId: 'not-an-id' }, { bytes, name: 'a.jpg' }), 'vesselId'],
      [form({ purpose: 'build', vesselId: vessel.id, caption: 'x'.repeat(201) }, { bytes, name: 'a.jpg' }), 'caption'],
      [form({ purpose: 'build', vesselId: vessel.id }), 'file'],
    ]
    for (const [body, field] of cases) {
      const res = await upload(owner.cookie, body)
      expect(res.status, JSON.stringify(res.body)).toBe(400)
      expect(Object.keys(res.body.data?.fields ?? {})).toContain(field)
    }
    const two = form({ purpose: 'build', vesselId: vessel.id }, { bytes, name: 'a.jpg' })
    two.append('file', new Blob([new Uint8Array(bytes)], { type: 'image/jpeg' }), 'b.jpg')
    expect((await upload(owner.cookie, two)).status).toBe(400)
    expect(storedFiles().filter(f => f.startsWith('.incoming'))).toEqual([])
  })

  it('lets only the owner or a read_all holder add build photos, and the owner or a witness gauge photos', async () => {
    const bytes = await jpegWithGps(200, 100)
    const send = (who: Member, purpose: string) => upload(who.cookie, form({ purpose, vesselId: vessel.id }, { bytes, name: 'g.jpg' }))
    expect((await send(other, 'build')).status).toBe(404)
    expect((await send(other, 'gauge')).status).toBe(404)
    expect((await send(outsider, 'build')).status).toBe(404)
    expect((await send(safety, 'build')).status).toBe(201)
    // The safety officer sees every vessel but does not witness proof tests.
    expect((await send(safety, 'gauge')).status).toBe(403)
    expect((await send(instructor, 'gauge')).status).toBe(201)
    expect((await send(owner, 'gauge')).status).toBe(201)
  })
})

describe('coupon photos', () => {
  it('are seen by every member of the club, and by nobody outside it', async () => {
    const res = await upload(other.cookie, form({ purpose: 'coupon' }, { bytes: await jpegWithGps(400, 300), name: 'coupon.jpg' }))
    expect(res.status).toBe(201)
    expect(res.body.vesselId).toBeNull()
    expect((await fetchPhoto(owner.cookie, res.body.url)).status).toBe(200)
    expect((await fetchPhoto(owner.cookie, res.body.thumbnailUrl)).status).toBe(200)
    expect((await fetchPhoto(outsider.cookie, res.body.url)).status).toBe(404)
    expect((await upload(other.cookie, form({ purpose: 'coupon', vesselId: vessel.id }, { bytes: await jpegWithGps(10, 10), name: 'c.jpg' }))).status).toBe(400)
  })
})

describe('DELETE /api/photos/[id]', () => {
  it('removes the row and its files for the uploader; another member gets 404', async () => {
    const res = await upload(owner.cookie, form({ purpose: 'build', vesselId: vessel.id }, { bytes: await jpegWithGps(300, 200), name: 'gone.jpg' }))
    const id = res.body.id
    expect((await api(`/api/photos/${id}`, { baseUrl: BASE, as: other.cookie, method: 'DELETE' })).status).toBe(404)
    expect(storedFiles()).toContain(`${id}.jpg`)
    expect((await api(`/api/photos/${id}`, { baseUrl: BASE, as: owner.cookie, method: 'DELETE' })).status).toBe(204)
    expect(storedFiles().filter(f => f.startsWith(id))).toEqual([])
    expect(await sql('SELECT id FROM photos WHERE id = $1', [id])).toEqual([])
  })

  it('keeps a gauge photo a recorded proof test points at (422), even for the safety officer', async () => {
    const { photoId } = await makePhoto({ uploadedBy: instructor.memberId, vesselId: vessel.id, purpose: 'gauge' })
    await makeProofTest({ vesselId: vessel.id, witnessId: instructor.memberId, testedOn: clubDay(-1), gaugePhotoId: photoId })
    const res = await api<{ data: { reasons: { code: string }[] } }>(`/api/photos/${photoId}`, { baseUrl: BASE, as: safety.cookie, method: 'DELETE' })
    expect(res.status).toBe(422)
    expect(res.body.data.reasons.map(r => r.code)).toEqual(['PHOTO_IN_RECORD'])
    expect(await sql('SELECT id FROM photos WHERE id = $1', [photoId])).toHaveLength(1)
  })

  it('makePhoto gives a row the routes see (no file behind it)', async () => {
    const [club] = await sql<{ id: string }>('SELECT club_id AS id FROM memberships WHERE id = $1', [owner.memberId])
    const { photoId } = await makePhoto({ clubId: club!.id, uploadedBy: owner.memberId, vesselId: vessel.id, purpose: 'gauge' })
    const list = await api<PhotoDto[]>(`/api/vessels/${vessel.id}/photos`, { baseUrl: BASE, as: owner.cookie })
    expect(list.body.find(p => p.id === photoId)).toMatchObject({ purpose: 'gauge', vesselId: vessel.id })
  })
})

/** The server's resident memory in bytes (Linux: VmRSS in /proc/<pid>/status). */
function residentBytes(): number {
  const kb = readFileSync(`/proc/${server!.pid}/status`, 'utf8').match(/^VmRSS:\s+(\d+) kB/m)?.[1]
  return Number(kb) * 1024
}

interface Streamed { status: number, connection: string | undefined, sentBytes: number, body: string }

/**
 * POSTs a multipart upload whose file part is `fileBytes` long, chunked (no Content-Length, so only
 * counting while it streams can stop it), in 64 KB chunks honouring back-pressure.
 */
function streamUpload(cookie: string, fileBytes: number): Promise<Streamed> {
  return new Promise((resolve, reject) => {
    const boundary = '----hoopwise-test-boundary'
    let sentBytes = 0
    let answer: Omit<Streamed, 'sentBytes'> | undefined
    const req = request(`${BASE}/api/photos`, { method: 'POST', headers: { 'content-type': `multipart/form-data; boundary=${boundary}`, 'transfer-encoding': 'chunked', cookie } })
    const finish = () => (answer ? resolve({ ...answer, sentBytes }) : reject(new Error(`no answer after ${sentBytes} bytes`)))
    req.on('response', (res) => {
      let body = ''
      res.setEncoding('utf8')
      res.on('data', (c: string) => (body += c))
      res.on('end', () => {
        answer = { status: res.statusCode ?? 0, connection: res.headers.connection, body }
        finish()
      })
    })
    // The server closes the connection after its 413: the rest of the body cannot be written.
    req.on('error', () => setTimeout(finish, 200))
    req.write(`--${boundary}\r\nContent-Disposition: form-data; name="purpose"\r\n\r\nbuild\r\n`
      + `--${boundary}\r\nContent-Disposition: form-data; name="vesselId"\r\n\r\n${vessel.id}\r\n`
      + `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="big.jpg"\r\nContent-Type: image/jpeg\r\n\r\n`)
    req.write(Buffer.from([0xFF, 0xD8, 0xFF, 0xE0]))
    const chunk = Buffer.alloc(64 * 1024, 0x41)
    const write = () => {
      while (sentBytes < fileBytes && !answer && !req.destroyed) {
        sentBytes += chunk.length
        if (!req.write(chunk)) return void req.once('drain', write)
      }
      if (!answer && !req.destroyed) req.end(`\r\n--${boundary}--\r\n`)
    }
    write()
  })
}

describe('an oversize upload', () => {
  it('is refused with 413 while it streams (40 MB, chunked): the connection closes, memory stays flat, no file is left', async () => {
    // Warm up: the route's code loads and a small upload goes through.
    for (let i = 0; i < 2; i++) expect([415, 422]).toContain((await streamUpload(owner.cookie, 0)).status)
    const before = residentBytes()
    const files = storedFiles()
    const answer = await streamUpload(owner.cookie, 40 * 1024 * 1024)
    const grown = residentBytes() - before
    expect(answer.status, answer.body).toBe(413)
    expect(answer.body).toMatch(/larger than 10 MB/)
    expect(answer.connection).toBe('close')
    expect(answer.sentBytes).toBeLessThan(40 * 1024 * 1024)
    expect(grown).toBeLessThan(20 * 1024 * 1024)
    // The temporary file is deleted as the refusal goes out.
    for (let i = 0; i < 20 && storedFiles().length !== files.length; i++) await new Promise(r => setTimeout(r, 100))
    expect(storedFiles()).toEqual(files)
  })
})
