/** Invented demo hospital (not a real place). */
export const DEMO_HOSPITAL = {
  name: 'Kestrel Vale General Hospital (demo)',
  service: 'Pre-operative Anaemia Service',
  phone: '01632 960 418', // Ofcom's drama range: never a real number
  email: 'anaemia.service@kestrelvale.ferrolane.test',
  timeZone: 'Europe/London',
}

/**
 * The demo hospital as the CLINIC_* settings, each unless the environment sets its own: npm start,
 * npm test and the demo cluster pass these to the server (server/config.ts knows no demo values).
 */
export function demoClinicEnv(env: NodeJS.ProcessEnv): Record<string, string> {
  return {
    CLINIC_NAME: env.CLINIC_NAME || DEMO_HOSPITAL.name,
    CLINIC_SERVICE: env.CLINIC_SERVICE || DEMO_HOSPITAL.service,
    CLINIC_PHONE: env.CLINIC_PHONE || DEMO_HOSPITAL.phone,
    CLINIC_EMAIL: env.CLINIC_EMAIL || DEMO_HOSPITAL.email,
    CLINIC_TIME_ZONE: env.CLINIC_TIME_ZONE || DEMO_HOSPITAL.timeZone,
  }
}
