/** Every URL of the client, once. */
export const paths = {
  home: { path: "/", href: () => "/" },
  signIn: { path: "/sign-in", href: (next?: string) => (next ? `/sign-in?next=${encodeURIComponent(next)}` : "/sign-in") },
  sites: { path: "/sites", href: () => "/sites" },
  site: { path: "/sites/:siteId", href: (siteId: string) => `/sites/${siteId}` },
  members: { path: "/sites/:siteId/members", href: (siteId: string) => `/sites/${siteId}/members` },
  admin: { path: "/admin", href: () => "/admin" },
  safety: { path: "/safety", href: () => "/safety" },
  invite: { path: "/invite/:token", href: (token: string) => `/invite/${token}` },
  resetRequest: { path: "/reset-password", href: () => "/reset-password" },
  resetPassword: { path: "/reset-password/:token", href: (token: string) => `/reset-password/${token}` },
  account: { path: "/account", href: () => "/account" },
  mailbox: { path: "/admin/mailbox", href: () => "/admin/mailbox" },
} as const;
