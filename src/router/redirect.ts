/**
 * Only same-site paths, so a crafted link cannot bounce a user to another origin. Apart from
 * router/index.ts so the sign-in view can use it without importing the router (an import cycle).
 */
export function safeRedirect(value: unknown): string | null {
  return typeof value === 'string' && value.startsWith('/') && !value.startsWith('//') ? value : null
}
