/**
 * A position on its board: the same URL as the inventory client's board page
 * (`paths.board.href(siteId, boardId, positionId)` on branch inventory-ui), written out
 * here because that path is not on this branch yet and features may not import each other.
 */
export const positionHref = (siteId: string, boardId: string, positionId: string) => `/sites/${siteId}/boards/${boardId}?position=${positionId}`;
