import { User } from '../models/index'
import type { Role } from '../../shared/roles'
import type { StaffOption } from '../../shared/pathway/views'

/** Active staff for pickers (the referral form's surgeon list): names only, no contact details. */
export async function listActiveStaff(role?: Role): Promise<StaffOption[]> {
  const rows = await User.findAll({
    where: { active: true, ...(role ? { role } : {}) },
    attributes: ['id', 'name', 'role'],
    order: [['name', 'ASC']],
    raw: true,
  })
  return rows.map((u) => ({ id: u.id, name: u.name, role: u.role }))
}

export async function isActiveSurgeon(id: number): Promise<boolean> {
  return (await User.count({ where: { id, role: 'surgeon', active: true } })) > 0
}
