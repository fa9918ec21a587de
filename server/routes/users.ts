import { ApiRouter } from './apiRouter'
import { idParam, signedInActor, type AppContext } from './context'
import { validate } from '../middleware/validate'
import { createUserSchema, updateUserSchema, type CreateUserInput, type UpdateUserInput } from '../../shared/schemas/users'
import { createStaff, listStaff, resetStaffPassword, updateStaff } from '../services/users'

export function userRoutes({ sequelize, config }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/users')

  api.get('', { action: 'users.manage' }, async (_req, res) => {
    res.json({ rows: await listStaff() })
  })

  api.post('', { action: 'users.manage' }, validate(createUserSchema), async (req, res) => {
    res.status(201).json(await createStaff(sequelize, signedInActor(req), req.body as CreateUserInput, config.passwords.temporaryHours))
  })

  api.patch('/:id', { action: 'users.manage' }, validate(updateUserSchema), async (req, res) => {
    res.json(await updateStaff(sequelize, signedInActor(req), idParam(req), req.body as UpdateUserInput))
  })

  api.post('/:id/reset-password', { action: 'users.manage' }, async (req, res) => {
    res.json(await resetStaffPassword(sequelize, signedInActor(req), idParam(req), config.passwords.temporaryHours))
  })

  return api
}
