// Every migration, listed explicitly in order: a glob finds nothing inside the built server.
import * as m0001 from './0001-foundation'
import * as m0004 from './0004-member-directory'
import * as m0005 from './0005-session-version'
import * as m0007 from './0007-sessions'
import * as m0008 from './0008-rate-limits'
import * as m0009 from './0009-notice-claims'
import * as m0010 from './0010-audit-actor-by-id'
import * as m0011 from './0011-directory-sort-keys'
import * as m0012 from './0012-member-audit-prefix'
import * as m0013 from './0013-vessels'
import * as m0014 from './0014-photos'
import * as m0015 from './0015-proof-tests'
import * as m0016 from './0016-coupon-tests'
import * as m0017 from './0017-training'
import * as m0018 from './0018-bookings'
import * as m0019 from './0019-dues'
import * as m0020 from './0020-tiers-and-fills'
import * as m0021 from './0021-one-initial-tier'
import * as m0022 from './0022-incidents'
import * as m0023 from './0023-imported-records'
import * as m0024 from './0024-roster-imports'
import * as m0025 from './0025-erasures'
import * as m0027 from './0027-desk-tallies'
import * as m0028 from './0028-desk-proof-standing'
import * as m0029 from './0029-club-front-door'
import * as m0030 from './0030-fill-snapshots'
import * as m0031 from './0031-training-latest-passes'
import * as m0032 from './0032-csv-cell'
import * as m0033 from './0033-latest-pass-user'
import * as m0034 from './0034-csv-field'

export const migrations = [
  { name: '0001-foundation', ...m0001 },
  { name: '0004-member-directory', ...m0004 },
  { name: '0005-session-version', ...m0005 },
  { name: '0007-sessions', ...m0007 },
  { name: '0008-rate-limits', ...m0008 },
  { name: '0009-notice-claims', ...m0009 },
  { name: '0010-audit-actor-by-id', ...m0010 },
  { name: '0011-directory-sort-keys', ...m0011 },
  { name: '0012-member-audit-prefix', ...m0012 },
  { name: '0013-vessels', ...m0013 },
  { name: '0014-photos', ...m0014 },
  { name: '0015-proof-tests', ...m0015 },
  { name: '0016-coupon-tests', ...m0016 },
  { name: '0017-training', ...m0017 },
  { name: '0018-bookings', ...m0018 },
  { name: '0019-dues', ...m0019 },
  { name: '0020-tiers-and-fills', ...m0020 },
  { name: '0021-one-initial-tier', ...m0021 },
  { name: '0022-incidents', ...m0022 },
  { name: '0023-imported-records', ...m0023 },
  { name: '0024-roster-imports', ...m0024 },
  { name: '0025-erasures', ...m0025 },
  { name: '0027-desk-tallies', ...m0027 },
  { name: '0028-desk-proof-standing', ...m0028 },
  { name: '0029-club-front-door', ...m0029 },
  { name: '0030-fill-snapshots', ...m0030 },
  { name: '0031-training-latest-passes', ...m0031 },
  { name: '0032-csv-cell', ...m0032 },
  { name: '0033-latest-pass-user', ...m0033 },
  { name: '0034-csv-field', ...m0034 },
]
