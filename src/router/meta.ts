import type { Role } from '@shared/roles'

declare module 'vue-router' {
  interface RouteMeta {
    /** Open without signing in, and shown without the app shell (sign-in, the patient reply page). */
    public?: boolean
    /** Roles allowed in; absent means any signed-in user. The server checks again. */
    roles?: readonly Role[]
    /** Page title shown in the browser tab. */
    title?: string
    /** Wide tables (worklists): the page may use the full window width. */
    wide?: boolean
    /** Listed in the main navigation, in this order, for the roles allowed. */
    nav?: { label: string; icon: string; order: number }
  }
}

export {}
