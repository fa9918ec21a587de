import { ApiRouter } from './apiRouter'
import type { AppContext } from './context'
import { isRole } from '../../shared/roles'
import { listActiveStaff } from '../services/staff'
import { Invalid } from '../errors'

/** Names of active colleagues for pickers (e.g. the surgeon on a referral); no contact details. */
export function staffRoutes(_ctx: AppContext): ApiRouter {
  const api = new ApiRouter('/api/staff')
  api.get('', { action: 'staff.list' }, async (req, res) => {
    const role = req.query.role
    if (role !== undefined && !isRole(role))
      throw new Invalid('role must be one of admin, nurse, doctor, surgeon', { role: 'must be one of admin, nurse, doctor, surgeon' })
    res.json({ rows: await listActiveStaff(role) })
  })
  return api
}
