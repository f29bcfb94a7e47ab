/**
 * Field names (as the code and the audit trail's before/after keep them) in words, for any page that
 * names a field: the audit trail's changes, "Phone, Emergency contact changed". A field without a
 * label shows its name; tests/api/audit-words.test.ts checks every field the audit trail records has one.
 */
export const FIELD_LABELS: Record<string, string> = {
  // Pressure tiers
  rank: 'Tier',
  tierState: 'Tier state',
  signedOn: 'Signed on',
  signoffId: 'Sign-off',
  initial: 'Initial grant',
  levels: 'Tier table',
  juniorCapRank: 'Junior cap',
  // A member's details
  name: 'Name',
  phone: 'Phone',
  emergencyContactName: 'Emergency contact',
  emergencyContactPhone: 'Emergency phone',
  unitPreference: 'Units',
  birthDate: 'Birth date',
  guardianName: 'Guardian\'s name',
  guardianEmail: 'Guardian\'s e-mail',
  guardianConsentAt: 'Guardian consent',
  junior: 'Junior (under 18)',
  // Membership
  status: 'Status',
  paidThrough: 'Dues paid through',
  approvedAt: 'Approved',
  suspendedAt: 'Suspended',
  resignedAt: 'Resigned',
  roles: 'Roles',
  // One-time links
  linksStopped: 'Older consent links stopped',
  otherResetLinksStopped: 'Other reset links stopped',
  // Waivers
  version: 'Version',
  title: 'Title',
  // E-mails and the notice job's run
  attempts: 'Tries so far',
  outcome: 'Outcome',
  queued: 'Reminders queued',
  sent: 'Sent',
  retried: 'To try again later',
  failed: 'Failed',
  skipped: 'Skipped (opted out)',
  // Vessels, proof tests and the vessel policy
  state: 'Vessel state',
  result: 'Proof result',
  medium: 'Test medium',
  pressureBar: 'Test pressure (bar)',
  ratedFillBar: 'Rated fill (bar)',
  kind: 'What happened',
  happenedOn: 'On',
  newLayupOn: 'New layup date',
  marginRatio: 'Proof margin',
  intervalMonths: 'Proof interval (months)',
  fillLimit: 'Fill limit',
  cureWaitDays: 'Cure wait (days)',
  airTestsAllowed: 'Air proof tests allowed',
  distanceRule: 'Distance rule',
  kProcess: 'Hand-layup process factor',
  // Training: courses, sessions and records
  description: 'Description',
  validityMonths: 'Validity (months)',
  passMarkPercent: 'Theory pass mark (%)',
  practicalRequired: 'Practical sign-off needed',
  courseId: 'Course',
  startsAt: 'Starts',
  endsAt: 'Ends',
  place: 'Place',
  capacity: 'Places',
  issued: 'Records issued',
  passed: 'Passed',
  retrainingReason: 'Retraining reason',
  trainedTo: 'Trained (last day)',
  expiresOn: 'Expires',
  evidenceFiles: 'Evidence files',
  // Workshop stations and bookings
  requiredCourses: 'Required courses',
  maxBookingMinutes: 'Longest booking (minutes)',
  openingHours: 'Opening hours',
  adultsOnly: 'Adults only',
  position: 'Order in the list',
  stationId: 'Station',
  // Dues
  membershipId: 'Member',
  method: 'Payment method',
  amountMinor: 'Amount (cents)',
  currency: 'Currency',
  plan: 'Dues plan',
  paidOn: 'Paid on',
  receipt: 'Receipt number',
  appliedBy: 'Refund applied by',
  priceMinor: 'Price (cents)',
  periodMonths: 'Period (months)',
  // Fill stations, launch events and the equipment factor
  equipmentFactor: 'Equipment factor',
  lowestPartRatingBar: 'Lowest rated pressure of any part (bar)',
  gaugeName: 'Gauge',
  gaugeCalibratedOn: 'Gauge calibrated on',
  gaugeIntervalMonths: 'Gauge calibration interval (months)',
  retired: 'Retired',
  heldOn: 'Day',
  site: 'Site',
  pressureCapBar: 'Pressure cap (bar)',
  competition: 'Competition',
  stationIds: 'Fill stations',
  staffIds: 'Staff',
  cancelled: 'Cancelled',
}

/** The words for field `name`, or the name itself when it has none. */
export function fieldLabel(name: string): string {
  return FIELD_LABELS[name] ?? name
}
