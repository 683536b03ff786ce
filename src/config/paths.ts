/** Every URL of the client, once. */
export const paths = {
  home: { path: "/", href: () => "/" },
  signIn: { path: "/sign-in", href: (next?: string) => (next ? `/sign-in?next=${encodeURIComponent(next)}` : "/sign-in") },
  sites: { path: "/sites", href: () => "/sites" },
  site: { path: "/sites/:siteId", href: (siteId: string) => `/sites/${siteId}` },
  members: { path: "/sites/:siteId/members", href: (siteId: string) => `/sites/${siteId}/members` },
  admin: { path: "/admin", href: () => "/admin" },
  photos: { path: "/sites/:siteId/photos", href: (siteId: string) => `/sites/${siteId}/photos` },
  photoShootList: { path: "/sites/:siteId/photos/shoot-list", href: (siteId: string, boardId?: string) => `/sites/${siteId}/photos/shoot-list${boardId ? `?boardId=${boardId}` : ""}` },
  photoGallery: {
    path: "/sites/:siteId/photos/gallery",
    href: (siteId: string, f: { boardId?: string; positionId?: string } = {}) =>
      `/sites/${siteId}/photos/gallery${f.positionId ? `?positionId=${f.positionId}` : f.boardId ? `?boardId=${f.boardId}` : ""}`,
  },
  safety: { path: "/safety", href: () => "/safety" },
  parts: { path: "/sites/:siteId/parts", href: (siteId: string, search = "") => `/sites/${siteId}/parts${search}` },
  partsPrint: { path: "/sites/:siteId/parts/print", href: (siteId: string, search = "") => `/sites/${siteId}/parts/print${search}` },
  partLine: { path: "/sites/:siteId/parts/:lineId", href: (siteId: string, lineId: string) => `/sites/${siteId}/parts/${lineId}` },
  shareParts: { path: "/share/parts/:token", href: (token: string) => `/share/parts/${token}` },
} as const;
