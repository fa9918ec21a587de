import type { Action } from '@shared/permissions'

declare module 'vue-router' {
  interface RouteMeta {
    /** Open without signing in, and shown without the app shell (sign-in, the patient reply page). */
    public?: boolean
    /** The action (shared/permissions.ts) a user needs to open it; absent means any signed-in user. The server checks again. */
    action?: Action
    /** Page title shown in the browser tab. */
    title?: string
    /** Wide tables (worklists): the page may use the full window width. */
    wide?: boolean
    /** Listed in the main navigation, in this order, for those whose role allows the action. */
    nav?: { label: string; icon: string; order: number }
  }
}

export {}
