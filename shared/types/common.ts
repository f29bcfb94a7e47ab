/** Shapes every list and refusal shares. Plain objects the routes return, never model instances. */

export interface Paged<T> {
  items: T[]
  page: number
  pageSize: number
  total: number
}

/** 422 body: a business rule refused the request. */
export interface RefusalBody {
  reasons: { code: string, message: string }[]
}
