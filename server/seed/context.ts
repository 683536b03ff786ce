/** What every seed step is handed: the demo site and its people. */
export interface SeedContext {
  siteId: string;
  /** user id by e-mail */
  people: Record<string, string>;
}
