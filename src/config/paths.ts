/** Every URL of the client, once. */
export const paths = {
  home: { path: "/", href: () => "/" },
  signIn: { path: "/sign-in", href: (next?: string) => (next ? `/sign-in?next=${encodeURIComponent(next)}` : "/sign-in") },
  sites: { path: "/sites", href: () => "/sites" },
  site: { path: "/sites/:siteId", href: (siteId: string) => `/sites/${siteId}` },
  members: { path: "/sites/:siteId/members", href: (siteId: string) => `/sites/${siteId}/members` },
  readings: { path: "/sites/:siteId/readings", href: (siteId: string) => `/sites/${siteId}/readings` },
  readingsBoard: { path: "/sites/:siteId/readings/boards/:boardId", href: (siteId: string, boardId: string) => `/sites/${siteId}/readings/boards/${boardId}` },
  readingsComponent: {
    path: "/sites/:siteId/readings/components/:componentId",
    href: (siteId: string, componentId: string) => `/sites/${siteId}/readings/components/${componentId}`,
  },
  readingsCriteria: { path: "/sites/:siteId/readings/criteria", href: (siteId: string) => `/sites/${siteId}/readings/criteria` },
  admin: { path: "/admin", href: () => "/admin" },
  safety: { path: "/safety", href: () => "/safety" },
} as const;
