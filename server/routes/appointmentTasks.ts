import { ApiRouter } from './apiRouter'
import { idParam, type AppContext } from './context'
import { viewerOf } from './pathwayContext'
import { validate } from '../middleware/validate'
import { taskQuerySchema, type TaskQuery } from '../../shared/schemas/appointments'
import { completeTask, listTasks } from '../services/appointmentTasks'

/** Patients' requests to rebook, for the nurses and doctors who book. */
export function appointmentTaskRoutes({ sequelize }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/tasks')
  api.get('', { action: 'tasks.work' }, validate(taskQuerySchema, 'query'), async (_req, res) => {
    res.json(await listTasks(res.locals.query as TaskQuery))
  })
  api.post('/:id/done', { action: 'tasks.work' }, async (req, res) => {
    res.json(await completeTask(sequelize, viewerOf(req), idParam(req)))
  })
  return api
}
