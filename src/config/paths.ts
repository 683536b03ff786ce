/** Every URL of the client, once. */
export const paths = {
  home: { path: "/", href: () => "/" },
  signIn: { path: "/sign-in", href: (next?: string) => (next ? `/sign-in?next=${encodeURIComponent(next)}` : "/sign-in") },
  sites: { path: "/sites", href: () => "/sites" },
  site: { path: "/sites/:siteId", href: (siteId: string) => `/sites/${siteId}` },
  members: { path: "/sites/:siteId/members", href: (siteId: string) => `/sites/${siteId}/members` },
  admin: { path: "/admin", href: () => "/admin" },
  safety: { path: "/safety", href: () => "/safety" },
} as const;
