/** Every URL of the client, once. */
export const paths = {
  home: { path: "/", href: () => "/" },
  signIn: {
    path: "/sign-in",
    href: (next?: string) => (next ? `/sign-in?next=${encodeURIComponent(next)}` : "/sign-in"),
  },
  sites: { path: "/sites", href: () => "/sites" },
  site: { path: "/sites/:siteId", href: (siteId: string) => `/sites/${siteId}` },
  members: { path: "/sites/:siteId/members", href: (siteId: string) => `/sites/${siteId}/members` },
  boards: { path: "/sites/:siteId/boards", href: (siteId: string) => `/sites/${siteId}/boards` },
  boardNew: { path: "/sites/:siteId/boards/new", href: (siteId: string) => `/sites/${siteId}/boards/new` },
  board: {
    path: "/sites/:siteId/boards/:boardId",
    href: (siteId: string, boardId: string, positionId?: string) =>
      `/sites/${siteId}/boards/${boardId}${positionId ? `?position=${positionId}` : ""}`,
  },
  boardSetup: {
    path: "/sites/:siteId/boards/:boardId/setup",
    href: (siteId: string, boardId: string, positionId?: string) =>
      `/sites/${siteId}/boards/${boardId}/setup${positionId ? `?position=${positionId}` : ""}`,
  },
  quickLog: {
    path: "/sites/:siteId/log",
    href: (siteId: string, positionId?: string) => `/sites/${siteId}/log${positionId ? `?position=${positionId}` : ""}`,
  },
  inventoryImport: {
    path: "/sites/:siteId/inventory/import",
    href: (siteId: string) => `/sites/${siteId}/inventory/import`,
  },
  floodEvents: { path: "/sites/:siteId/flood", href: (siteId: string) => `/sites/${siteId}/flood` },
  defects: {
    path: "/sites/:siteId/defects",
    href: (siteId: string, query = "") => `/sites/${siteId}/defects${query ? `?${query}` : ""}`,
  },
  defectNew: {
    path: "/sites/:siteId/defects/new",
    href: (
      siteId: string,
      prefill: {
        positionId?: string;
        componentId?: string;
        inspectionId?: string;
        category?: string;
        severity?: string;
        boardId?: string;
      } = {},
    ) => {
      const q = new URLSearchParams(Object.entries(prefill).filter(([, v]) => v) as Array<[string, string]>).toString();
      return `/sites/${siteId}/defects/new${q ? `?${q}` : ""}`;
    },
  },
  defect: {
    path: "/sites/:siteId/defects/:defectId",
    href: (siteId: string, defectId: string) => `/sites/${siteId}/defects/${defectId}`,
  },
  priorityHelp: {
    path: "/sites/:siteId/defects/how-priority-works",
    href: (siteId: string) => `/sites/${siteId}/defects/how-priority-works`,
  },
  repairPlan: { path: "/sites/:siteId/repair-plan", href: (siteId: string) => `/sites/${siteId}/repair-plan` },
  readings: { path: "/sites/:siteId/readings", href: (siteId: string) => `/sites/${siteId}/readings` },
  readingsBoard: {
    path: "/sites/:siteId/readings/boards/:boardId",
    href: (siteId: string, boardId: string) => `/sites/${siteId}/readings/boards/${boardId}`,
  },
  readingsComponent: {
    path: "/sites/:siteId/readings/components/:componentId",
    href: (siteId: string, componentId: string) => `/sites/${siteId}/readings/components/${componentId}`,
  },
  readingsCriteria: {
    path: "/sites/:siteId/readings/criteria",
    href: (siteId: string) => `/sites/${siteId}/readings/criteria`,
  },
  admin: { path: "/admin", href: () => "/admin" },
  photos: { path: "/sites/:siteId/photos", href: (siteId: string) => `/sites/${siteId}/photos` },
  photoShootList: {
    path: "/sites/:siteId/photos/shoot-list",
    href: (siteId: string, boardId?: string) =>
      `/sites/${siteId}/photos/shoot-list${boardId ? `?boardId=${boardId}` : ""}`,
  },
  photoGallery: {
    path: "/sites/:siteId/photos/gallery",
    /** A position's photos (with its board when known, so the page names it without reading the site), or a board's. */
    href: (siteId: string, f: { boardId?: string; positionId?: string } = {}) =>
      `/sites/${siteId}/photos/gallery${f.positionId ? `?positionId=${f.positionId}${f.boardId ? `&boardId=${f.boardId}` : ""}` : f.boardId ? `?boardId=${f.boardId}` : ""}`,
  },
  safety: { path: "/safety", href: () => "/safety" },
  invite: { path: "/invite/:token", href: (token: string) => `/invite/${token}` },
  resetRequest: { path: "/reset-password", href: () => "/reset-password" },
  resetPassword: { path: "/reset-password/:token", href: (token: string) => `/reset-password/${token}` },
  account: { path: "/account", href: () => "/account" },
  mailbox: { path: "/admin/mailbox", href: () => "/admin/mailbox" },
  parts: { path: "/sites/:siteId/parts", href: (siteId: string, search = "") => `/sites/${siteId}/parts${search}` },
  partsPrint: {
    path: "/sites/:siteId/parts/print",
    href: (siteId: string, search = "") => `/sites/${siteId}/parts/print${search}`,
  },
  partLine: {
    path: "/sites/:siteId/parts/:lineId",
    href: (siteId: string, lineId: string) => `/sites/${siteId}/parts/${lineId}`,
  },
  reports: { path: "/sites/:siteId/reports", href: (siteId: string) => `/sites/${siteId}/reports` },
  scan: { path: "/scan", href: () => "/scan" },
  /** The short URL in a tag's QR code. */
  tag: { path: "/t/:tag", href: (tag: string) => `/t/${encodeURIComponent(tag)}` },
  shareParts: { path: "/share/parts/:token", href: (token: string) => `/share/parts/${token}` },
  returnToService: {
    path: "/sites/:siteId/return-to-service",
    href: (siteId: string) => `/sites/${siteId}/return-to-service`,
  },
  rtsBoard: {
    path: "/sites/:siteId/boards/:boardId/return-to-service",
    href: (siteId: string, boardId: string, stageId?: string) =>
      `/sites/${siteId}/boards/${boardId}/return-to-service${stageId ? `#stage-${stageId}` : ""}`,
  },
  rtsWatch: {
    path: "/sites/:siteId/boards/:boardId/watch",
    href: (siteId: string, boardId: string, stageId?: string) =>
      `/sites/${siteId}/boards/${boardId}/watch${stageId ? `?stage=${stageId}` : ""}`,
  },
  rtsStageSheet: {
    path: "/sites/:siteId/boards/:boardId/return-to-service/stages/:stageId/sheet",
    href: (siteId: string, boardId: string, stageId: string) =>
      `/sites/${siteId}/boards/${boardId}/return-to-service/stages/${stageId}/sheet`,
  },
  rtsSettings: {
    path: "/sites/:siteId/return-to-service/settings",
    href: (siteId: string) => `/sites/${siteId}/return-to-service/settings`,
  },
} as const;
