/** Every URL of the client, once. */
export const paths = {
  home: { path: "/", href: () => "/" },
  signIn: { path: "/sign-in", href: (next?: string) => (next ? `/sign-in?next=${encodeURIComponent(next)}` : "/sign-in") },
  sites: { path: "/sites", href: () => "/sites" },
  site: { path: "/sites/:siteId", href: (siteId: string) => `/sites/${siteId}` },
  members: { path: "/sites/:siteId/members", href: (siteId: string) => `/sites/${siteId}/members` },
  defects: { path: "/sites/:siteId/defects", href: (siteId: string, query = "") => `/sites/${siteId}/defects${query ? `?${query}` : ""}` },
  defectNew: {
    path: "/sites/:siteId/defects/new",
    href: (siteId: string, prefill: { positionId?: string; componentId?: string; inspectionId?: string; category?: string; severity?: string; boardId?: string } = {}) => {
      const q = new URLSearchParams(Object.entries(prefill).filter(([, v]) => v) as Array<[string, string]>).toString();
      return `/sites/${siteId}/defects/new${q ? `?${q}` : ""}`;
    },
  },
  defect: { path: "/sites/:siteId/defects/:defectId", href: (siteId: string, defectId: string) => `/sites/${siteId}/defects/${defectId}` },
  priorityHelp: { path: "/sites/:siteId/defects/how-priority-works", href: (siteId: string) => `/sites/${siteId}/defects/how-priority-works` },
  repairPlan: { path: "/sites/:siteId/repair-plan", href: (siteId: string) => `/sites/${siteId}/repair-plan` },
  admin: { path: "/admin", href: () => "/admin" },
  safety: { path: "/safety", href: () => "/safety" },
} as const;
