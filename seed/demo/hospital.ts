/** Invented demo hospital (not a real place). */
export const DEMO_HOSPITAL = {
  name: 'Kestrel Vale General Hospital (demo)',
  service: 'Pre-operative Anaemia Service',
  phone: '01632 960 418', // Ofcom's drama range: never a real number
  email: 'anaemia.service@kestrelvale.ferrolane.test',
  timeZone: 'Europe/London',
}
