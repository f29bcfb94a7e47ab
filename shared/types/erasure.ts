/** What an erasure did, for the admin who asked for it. */
export interface ErasureDto {
  membershipId: string
  /** The name the member's records carry from now on. */
  pseudonym: string
  /** Customer records deleted at the payment service. */
  paymentCustomersDeleted: number
  /** Personal files removed from the uploads folder (build photos, evidence of courses taken elsewhere). */
  filesRemoved: number
}
