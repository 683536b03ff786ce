import { paths } from "../../../config/paths";

/** A position on its board: the board page opens its side panel. */
export const positionHref = (siteId: string, boardId: string, positionId: string) =>
  paths.board.href(siteId, boardId, positionId);
