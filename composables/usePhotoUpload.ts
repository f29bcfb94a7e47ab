import { PHOTO_CONTENT_TYPES, PHOTO_MAX_BYTES, type PhotoPurpose } from '~~/shared/schemas/photo'
import type { PhotoDto } from '~~/shared/types/photos'

/**
 * Uploads one photo (multipart POST /api/photos) with a progress figure; the one way the pages send a
 * photo, for a vessel's build stages, a proof test's gauge or a burst coupon. `check` only saves a
 * wasted upload: the server judges the file from its content and strips its metadata.
 */
export function usePhotoUpload() {
  const progress = ref<number | null>(null)
  const busy = computed(() => progress.value !== null)

  /** Why `file` cannot be uploaded, or null when it may be. */
  function check(file: File): string | null {
    if (file.size > PHOTO_MAX_BYTES) return 'The photo is larger than 10 MB. Choose a smaller one.'
    if (file.type && !(PHOTO_CONTENT_TYPES as readonly string[]).includes(file.type)) return 'Choose a JPEG, PNG or WebP photo.'
    return null
  }

  /** POSTs with XMLHttpRequest, which reports upload progress ($fetch does not); rejects like $fetch ({ status, data }). */
  function send(form: FormData): Promise<PhotoDto> {
    return new Promise((resolve, reject) => {
      const xhr = new XMLHttpRequest()
      xhr.open('POST', '/api/photos')
      xhr.setRequestHeader('accept', 'application/json')
      xhr.upload.onprogress = (e) => {
        if (e.lengthComputable) progress.value = Math.round((e.loaded / e.total) * 100)
      }
      xhr.onload = () => {
        let body: unknown = null
        try {
          body = JSON.parse(xhr.responseText)
        }
        catch { /* not JSON */ }
        if (xhr.status === 201) resolve(body as PhotoDto)
        else reject({ status: xhr.status, data: body })
      }
      xhr.onerror = () => reject({ status: null })
      xhr.send(form)
    })
  }

  async function upload(o: { file: File, purpose: PhotoPurpose, vesselId?: string | null, incidentId?: string | null, caption?: string }): Promise<PhotoDto> {
    const form = new FormData()
    form.append('purpose', o.purpose)
    if (o.vesselId) form.append('vesselId', o.vesselId)
    if (o.incidentId) form.append('incidentId', o.incidentId)
    if (o.caption?.trim()) form.append('caption', o.caption.trim())
    form.append('file', o.file)
    progress.value = 0
    try {
      return await send(form)
    }
    finally {
      progress.value = null
    }
  }

  return { progress, busy, check, upload }
}
