import type { RouteRecordRaw } from 'vue-router'
import { ROLE_HOMES } from './homes'

// Each screen names the action it needs in shared/permissions.ts; the server checks again.

// '/' never renders: the guard always sends a signed-in user on to their role's home.
const RoleHomeRedirect = { render: () => null }

export const routes: RouteRecordRaw[] = [
  { path: '/', name: 'home', component: RoleHomeRedirect },
  {
    path: '/sign-in',
    name: 'sign-in',
    component: () => import('@/views/SignInView.vue'),
    meta: { public: true, title: 'Sign in' },
  },
  {
    path: '/sign-in/refused',
    name: 'sign-in-refused',
    component: () => import('@/views/SignInRefusedView.vue'),
    meta: { public: true, title: 'Sign-in refused' },
  },
  {
    path: '/screening',
    name: 'nurse-home',
    component: () => import('@/views/NurseHomeView.vue'),
    meta: {
      action: 'home.screening',
      title: ROLE_HOMES.nurse.title,
      wide: true,
      nav: { label: 'Screening', icon: 'pi pi-list-check', order: 10 },
    },
  },
  {
    path: '/clinic',
    name: 'doctor-home',
    component: () => import('@/views/DoctorHomeView.vue'),
    meta: {
      action: 'home.clinic',
      title: ROLE_HOMES.doctor.title,
      wide: true,
      nav: { label: 'Clinic', icon: 'pi pi-briefcase', order: 10 },
    },
  },
  {
    path: '/theatre',
    name: 'surgeon-home',
    component: () => import('@/views/SurgeonHomeView.vue'),
    meta: {
      action: 'home.theatre',
      title: ROLE_HOMES.surgeon.title,
      wide: true,
      nav: { label: 'Readiness', icon: 'pi pi-calendar-clock', order: 10 },
    },
  },
  {
    path: '/admin',
    name: 'admin-home',
    component: () => import('@/views/AdminHomeView.vue'),
    meta: { action: 'home.administration', title: ROLE_HOMES.admin.title, nav: { label: 'Administration', icon: 'pi pi-cog', order: 10 } },
  },
  {
    path: '/admin/users',
    name: 'admin-users',
    component: () => import('@/views/AdminUsersView.vue'),
    meta: { action: 'users.manage', title: 'Staff accounts', nav: { label: 'Staff accounts', icon: 'pi pi-users', order: 20 } },
  },
  {
    path: '/admin/formulary',
    name: 'admin-formulary',
    component: () => import('@/views/AdminFormularyView.vue'),
    meta: { action: 'formulary.manage', title: 'Iron formulary', nav: { label: 'Formulary', icon: 'pi pi-box', order: 22 } },
  },
  {
    path: '/admin/settings',
    name: 'admin-settings',
    component: () => import('@/views/AdminClinicSettingsView.vue'),
    meta: { action: 'settings.manage', title: 'Clinic thresholds', nav: { label: 'Thresholds', icon: 'pi pi-sliders-h', order: 24 } },
  },
  {
    path: '/admin/operations',
    name: 'admin-operations',
    component: () => import('@/views/AdminCatalogueView.vue'),
    meta: { action: 'procedures.manage', title: 'Operations catalogue', nav: { label: 'Operations', icon: 'pi pi-th-large', order: 26 } },
  },
  {
    path: '/readiness',
    name: 'readiness',
    component: () => import('@/views/ReadinessView.vue'),
    meta: {
      action: 'records.read',
      title: 'Readiness board',
      wide: true,
      // Surgeons' home is this board already (AppShellNav leaves it out for them).
      nav: { label: 'Readiness', icon: 'pi pi-calendar-clock', order: 32 },
    },
  },
  {
    path: '/reports',
    name: 'reports',
    component: () => import('@/views/ReportsView.vue'),
    // Surgeons see only their own figures; the server forces it.
    meta: { action: 'reports.read', title: 'Service reports', wide: true, nav: { label: 'Reports', icon: 'pi pi-chart-bar', order: 50 } },
  },
  {
    path: '/quality',
    name: 'quality',
    component: () => import('@/views/QualityView.vue'),
    // Surgeons see only their own figures; admins figures without patients (the server forces both).
    // Reached from the Reports screen, so the top bar still fits at 1024 px.
    meta: { action: 'reports.read', title: 'Quality measures', wide: true },
  },
  {
    path: '/admin/audit',
    name: 'audit-trail',
    component: () => import('@/views/AuditTrailView.vue'),
    meta: { action: 'audit.read', title: 'Audit trail', wide: true, nav: { label: 'Audit trail', icon: 'pi pi-history', order: 28 } },
  },
  {
    path: '/admin/interfaces',
    name: 'interfaces',
    component: () => import('@/views/AdminInterfacesView.vue'),
    meta: {
      action: 'hl7.overview',
      title: 'Interfaces',
      wide: true,
      nav: { label: 'Interfaces', icon: 'pi pi-arrow-right-arrow-left', order: 29 },
    },
  },
  {
    path: '/worklist',
    name: 'worklist',
    component: () => import('@/views/WorklistView.vue'),
    meta: { action: 'records.read', title: 'Worklist', wide: true, nav: { label: 'Worklist', icon: 'pi pi-list', order: 30 } },
  },
  {
    path: '/imports',
    name: 'import-results',
    component: () => import('@/views/ImportResultsView.vue'),
    // Administrators see the batch list (no patient in it); the clinical importers upload.
    meta: {
      action: 'imports.read',
      title: 'Import results',
      wide: true,
      nav: { label: 'Import results', icon: 'pi pi-file-import', order: 30 },
    },
  },
  {
    path: '/referrals/new',
    name: 'register',
    component: () => import('@/views/RegisterReferralView.vue'),
    // Nurses and clinic doctors write clinical records; the server checks again.
    meta: { action: 'records.write', title: 'Register a patient', nav: { label: 'Register patient', icon: 'pi pi-user-plus', order: 40 } },
  },
  {
    // Digits only, so '/referrals/new' can never be read as an episode id.
    path: '/referrals/:id(\\d+)',
    name: 'episode',
    component: () => import('@/views/EpisodeView.vue'),
    meta: { action: 'records.read', title: 'Episode', wide: true },
  },
  {
    path: '/account/password',
    name: 'change-password',
    component: () => import('@/views/ChangePasswordView.vue'),
    meta: { action: 'auth.account', title: 'Change password' },
  },
  {
    path: '/account/authenticator',
    name: 'second-factor',
    component: () => import('@/views/SecondFactorView.vue'),
    meta: { action: 'auth.account', title: 'Authenticator' },
  },
  {
    // Patients open this from their appointment e-mail: no account, no app shell.
    path: '/reply/:token',
    name: 'appointment-reply',
    component: () => import('@/views/AppointmentReplyView.vue'),
    meta: { public: true, title: 'Your appointment' },
  },
  {
    path: '/forbidden',
    name: 'forbidden',
    component: () => import('@/views/ForbiddenView.vue'),
    meta: { title: 'No access' },
  },
  {
    path: '/:pathMatch(.*)*',
    name: 'not-found',
    component: () => import('@/views/NotFoundView.vue'),
    meta: { title: 'Page not found' },
  },
]
