/** The inventory shapes the client works with, all from the shared schemas. */
export type {
  AuditRow,
  Board,
  BoardDetail,
  Component,
  CustodyMove,
  FloodEvent,
  Inspection,
  PositionDetail,
  RecommendationResponse,
  Section,
  TileRow,
} from "../../schemas/inventory";
