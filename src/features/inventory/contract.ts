/** The inventory shapes the client works with, all from the shared schemas. */
export type {
  AuditRow, Board, BoardDetail, BoardListItem, Component, CustodyMove, DispositionDecision, FloodEvent, ImportResponse,
  ImportRow, Inspection, LookupMatch, Overview, PositionDetail, RecommendationResponse, Section, TileRow,
} from "../../schemas/inventory";
