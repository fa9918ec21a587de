import type { QueryInterface } from 'sequelize'
import * as m0001 from './0001-foundation'
import * as m0002 from './0002-pathway'
import * as m0003 from './0003-clinic'
import * as m0004 from './0004-appointments'
import * as m0005 from './0005-worklist-sort'
import * as m0006 from './0006-outcomes'
import * as m0007 from './0007-imports'
import * as m0008 from './0008-documents'
import * as m0010 from './0010-transfusion-inputs'
import * as m0011 from './0011-dosing-safety'
import * as m0012 from './0012-transfusions'
import * as m0013 from './0013-hl7'
import * as m0014 from './0014-security'
import * as m0015 from './0015-directory-sign-in'
import * as m0016 from './0016-iron-response-flags'
import * as m0017 from './0017-dosing-table-choice'
import * as m0018 from './0018-operation-cancellations'
import * as m0019 from './0019-result-range-flags'
import * as m0024 from './0024-report-covering-index'
import * as m0025 from './0025-report-range-indexes'
import * as m0026 from './0026-episode-facts'
import * as m0027 from './0027-referral-milestones'
import * as m0028 from './0028-referrals-open-episode-index'

export interface Migration {
  name: string
  up(params: { context: QueryInterface }): Promise<void>
  down(params: { context: QueryInterface }): Promise<void>
}

/** In order. Listed by hand so they bundle and type-check like the rest of the server. */
export const migrations: Migration[] = [
  { name: '0001-foundation', ...m0001 },
  { name: '0002-pathway', ...m0002 },
  { name: '0003-clinic', ...m0003 },
  { name: '0004-appointments', ...m0004 },
  { name: '0005-worklist-sort', ...m0005 },
  { name: '0006-outcomes', ...m0006 },
  { name: '0007-imports', ...m0007 },
  { name: '0008-documents', ...m0008 },
  { name: '0010-transfusion-inputs', ...m0010 },
  { name: '0011-dosing-safety', ...m0011 },
  { name: '0012-transfusions', ...m0012 },
  { name: '0013-hl7', ...m0013 },
  { name: '0014-security', ...m0014 },
  { name: '0015-directory-sign-in', ...m0015 },
  { name: '0016-iron-response-flags', ...m0016 },
  { name: '0017-dosing-table-choice', ...m0017 },
  { name: '0018-operation-cancellations', ...m0018 },
  { name: '0019-result-range-flags', ...m0019 },
  { name: '0024-report-covering-index', ...m0024 },
  { name: '0025-report-range-indexes', ...m0025 },
  { name: '0026-episode-facts', ...m0026 },
  { name: '0027-referral-milestones', ...m0027 },
  { name: '0028-referrals-open-episode-index', ...m0028 },
]
