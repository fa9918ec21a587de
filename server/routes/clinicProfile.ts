import { ApiRouter } from './apiRouter'
import type { AppContext } from './context'
import { zoneName, zoneShortName } from '../../shared/appointments/time'
import type { ClinicProfile } from '../../shared/settings/views'

/**
 * Facts about the clinic the client needs to show times the way patients read them: the zone
 * appointments are stated in comes from the server's CLINIC_TIME_ZONE, never from the browser.
 */
export function clinicProfileRoutes({ config }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/clinic-profile')
  api.get('', { action: 'clinicProfile.read' }, (_req, res) => {
    const { name, service, phone, timeZone } = config.clinic
    const profile: ClinicProfile = { name, service, phone, timeZone, zoneLabel: zoneShortName(timeZone), zoneName: zoneName(timeZone) }
    res.json(profile)
  })
  return api
}
