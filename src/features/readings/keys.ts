/** The readings' query keys (all under `all(siteId)`: every reading write reads the site's readings again). */
export const readingKeys = {
  all: (siteId: string) => ["readings", siteId] as const,
  targets: (siteId: string) => [...readingKeys.all(siteId), "targets"] as const,
  criteria: (siteId: string) => [...readingKeys.all(siteId), "criteria"] as const,
  board: (siteId: string, boardId: string) => [...readingKeys.all(siteId), "board", boardId] as const,
  component: (siteId: string, componentId: string) => [...readingKeys.all(siteId), "component", componentId] as const,
  dryOut: (siteId: string, boardId: string, series: string) =>
    [...readingKeys.all(siteId), "dry-out", boardId, series] as const,
  latestGround: (siteId: string, boardId: string) => [...readingKeys.all(siteId), "latest-ground", boardId] as const,
};
