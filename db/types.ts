/**
 * The Database interface Kysely checks every query against. Hand-kept beside the
 * migrations; property names are camelCase (CamelCasePlugin maps them to snake_case).
 */
import type { ColumnType, Generated } from "kysely";
import type { StageStatus, StepKind, Supply, VoltageStep } from "../src/domain/return-to-service";
import type { LeadSourceKind, LeadStatus } from "../src/domain/part-workflow";
import type {
  ComponentKind,
  Contaminant,
  Custody,
  DefectCategory,
  DefectSeverity,
  DefectStatus,
  Disposition,
  Earthing,
  Heritage,
  HeritageRule,
  InsulationState,
  Mechanism,
  PartStatus,
  PhotoKind,
  Role,
  WaterType,
} from "../src/domain/vocab";

type Timestamp = ColumnType<Date, Date | string | undefined, Date | string>;

export interface UsersTable {
  id: Generated<string>;
  email: string;
  name: string;
  passwordHash: string | null;
  isAdmin: Generated<boolean>;
  createdAt: Timestamp;
  updatedAt: Timestamp;
  /** Set while an instance admin has the account suspended (migration 2026_12_15_0100). */
  suspendedAt: Date | null;
  suspendedBy: string | null;
  suspendedReason: Generated<string>;
}

export interface SessionsTable {
  id: string;
  userId: string;
  expiresAt: ColumnType<Date, Date, Date>;
}

export interface SitesTable {
  id: Generated<string>;
  name: string;
  kind: "vessel" | "building" | "plant";
  location: Generated<string>;
  description: Generated<string>;
  createdAt: Timestamp;
  /** ISO 4217 code for the site's costs. */
  currency: Generated<string>;
  /** IANA time zone of the site's local time, for exports. */
  timeZone: Generated<string>;
}

export interface MembershipsTable {
  siteId: string;
  userId: string;
  role: Role;
  createdAt: Timestamp;
}

/** Columns every editable record has: optimistic `version`, created/updated stamps. */
interface Versioned {
  id: Generated<string>;
  siteId: string;
  version: Generated<number>;
  createdAt: Timestamp;
  updatedAt: Timestamp;
}
type Text = Generated<string>;
type Num = number | null;

export interface FloodEventsTable extends Versioned {
  occurredOn: string;
  waterType: WaterType;
  maxDepthM: Num;
  hoursSubmerged: Num;
  notes: Text;
}

export interface BoardsTable extends Versioned {
  name: string;
  location: Text;
  nominalVolts: Generated<number>;
  phases: Generated<1 | 3>;
  frequencyHz: Generated<number>;
  earthing: Generated<Earthing>;
  yearBuilt: Num;
  drawingRef: Text;
  /** Height of the board face and of the flood water line on it, both from the floor. */
  faceHeightMm: Num;
  waterLineMm: Num;
  gridRows: Generated<number>;
  gridCols: Generated<number>;
  notes: Text;
}

export interface SectionsTable extends Versioned {
  boardId: string;
  name: string;
  sortOrder: Generated<number>;
  notes: Text;
}

export interface PositionsTable extends Versioned {
  boardId: string;
  sectionId: string | null;
  /** As painted on the board, e.g. "2-14"; unique per board, case-insensitively. */
  designation: string;
  kind: ComponentKind;
  gridRow: number;
  gridCol: number;
  rowSpan: Generated<number>;
  colSpan: Generated<number>;
  circuit: Text;
  sortOrder: Generated<number>;
}

export interface ComponentsTable extends Versioned {
  /** Its home position: a component taken out for cleaning comes back here. */
  positionId: string;
  kind: ComponentKind;
  maker: Text;
  model: Text;
  frame: Text;
  mounting: Text;
  ratingAmps: Num;
  poles: Num;
  voltageRating: Num;
  interruptingKa: Num;
  serial: Text;
  year: Num;
  meterRange: Text;
  lampWatts: Num;
  heritage: Generated<Heritage>;
  tagNumber: string | null;
  custody: Generated<Custody>;
  custodyLocation: Text;
  disposition: Disposition | null;
  dispositionReason: Text;
  dispositionRecommended: Disposition | null;
  dispositionOverridden: Generated<boolean>;
  dispositionBy: string | null;
  dispositionAt: Date | null;
  /** Set when the component leaves its position for good (scrapped, superseded). */
  retiredAt: Date | null;
  notes: Text;
}

export interface InspectionsTable {
  id: Generated<string>;
  siteId: string;
  componentId: string;
  positionId: string;
  inspectorId: string | null;
  inspectedAt: Timestamp;
  percentRusted: Num;
  astmGrade: Num;
  isoRi: string | null;
  belowWaterLine: boolean | null;
  contaminants: ColumnType<Contaminant[], Contaminant[] | undefined, Contaminant[]>;
  mechanism: Mechanism | null;
  insulation: InsulationState | null;
  notes: Text;
  createdAt: Timestamp;
}

export interface CustodyMovesTable {
  id: Generated<string>;
  siteId: string;
  componentId: string;
  fromState: Custody;
  toState: Custody;
  location: Text;
  note: Text;
  movedBy: string | null;
  movedAt: Timestamp;
  /** When the move was made on the phone (its clock corrected), when it was kept there and sent later; else null. */
  madeAt: Timestamp | null;
  /** Rules of src/domain/custody-chain.ts the curator released for this move. */
  releasedRules: ColumnType<string[], string[] | undefined, string[]>;
  releaseReason: Generated<string>;
}

export interface DispositionDecisionsTable {
  id: Generated<string>;
  siteId: string;
  componentId: string;
  disposition: Disposition;
  recommended: Disposition | null;
  overridden: Generated<boolean>;
  reason: Text;
  decidedBy: string | null;
  decidedAt: Timestamp;
}

/** rate-limiter-flexible's PostgreSQL store (server/auth/throttle.ts); expire is ms since the epoch. */
export interface RateLimitsTable {
  key: string;
  points: number;
  expire: number | null;
}

export interface AuditLogTable {
  id: Generated<number>;
  /** null for what belongs to no site: sign-ins, accounts (migration 2026_12_02_0200). */
  siteId: string | null;
  entityType: string;
  entityId: string;
  boardId: string | null;
  positionId: string | null;
  action: string;
  actorId: string | null;
  at: Timestamp;
  before: ColumnType<unknown, string | null | undefined, string | null>;
  after: ColumnType<unknown, string | null | undefined, string | null>;
}

export interface DefectsTable extends Versioned {
  boardId: string;
  sectionId: string | null;
  positionId: string | null;
  componentId: string | null;
  inspectionId: string | null;
  title: string;
  description: Text;
  category: DefectCategory;
  severity: DefectSeverity;
  safetyCritical: Generated<boolean>;
  blocksEnergisation: Generated<boolean>;
  effortHours: Num;
  costEstimate: Num;
  partsNeeded: Text;
  partsState: Generated<"none_needed" | "in_hand" | "wanted" | "unobtainable">;
  assigneeId: string | null;
  dueOn: string | null;
  status: Generated<DefectStatus>;
  statusReason: Text;
  repairedBy: string | null;
  verifiedBy: string | null;
  closedAt: Date | null;
  createdBy: string | null;
  /** priorityScore() of src/domain/priority.ts, stored on every write so the register sorts by it. */
  priorityScore: Generated<number>;
  /** Human reference shown as D-<ref> (migration 0400). */
  ref: Generated<number>;
}

/** A curator's pin of a defect just above or below another, with the reason (migration 0400). */
export interface DefectPinsTable {
  id: Generated<string>;
  siteId: string;
  defectId: string;
  direction: "above" | "below";
  relativeTo: string;
  reason: string;
  pinnedBy: string | null;
  pinnedAt: Timestamp;
  removedAt: Date | null;
  removedBy: string | null;
  removedReason: Generated<string>;
}

export interface DefectStatusChangesTable {
  id: Generated<number>;
  siteId: string;
  defectId: string;
  fromStatus: DefectStatus | null;
  toStatus: DefectStatus;
  reason: Generated<string>;
  actorId: string | null;
  at: Timestamp;
}

/** A person's saved register view: the register's URL query string under a name. */
export interface DefectViewsTable {
  id: Generated<string>;
  siteId: string;
  userId: string;
  name: string;
  query: Generated<string>;
  version: Generated<number>;
  createdAt: Timestamp;
  updatedAt: Timestamp;
}

export interface PhotosTable extends Versioned {
  boardId: string | null;
  positionId: string | null;
  componentId: string | null;
  defectId: string | null;
  inspectionId: string | null;
  /** A custody move the photo was taken with. */
  custodyMoveId: Generated<string | null>;
  kind: Generated<PhotoKind>;
  caption: Text;
  originalName: Text;
  format: string;
  width: number;
  height: number;
  bytes: number;
  capturedAt: Date | null;
  cameraModel: Text;
  originalKey: string;
  displayKey: string;
  thumbKey: string;
  uploadedBy: string | null;
  deletedAt: Date | null;
  /** 'processing' until the rendition job has written the display copy and thumbnail. */
  renditionState: Generated<RenditionState>;
  renditionError: string | null;
}

export type RenditionState = "processing" | "ready" | "failed";
export type OutboxStatus = "queued" | "retrying" | "sent" | "failed";

/** E-mail waiting for, or past, delivery by the "mail.send" job (server/mail/outbox.ts). */
export interface MailOutboxTable {
  id: Generated<string>;
  toAddress: string;
  fromName: string | null;
  subject: string;
  textBody: string;
  htmlBody: string;
  status: Generated<OutboxStatus>;
  attempts: Generated<number>;
  lastError: string | null;
  refType: string | null;
  refId: string | null;
  createdAt: Generated<Date>;
  sentAt: Date | null;
}

export type SendStatus = "pending" | "sent" | "failed";
export type NotificationKey = "defect_assigned" | "awaiting_verification" | "weekly_summary" | "watch_overdue";

export interface InvitationsTable {
  id: Generated<string>;
  siteId: string;
  email: string;
  role: Role;
  /** SHA-256 of the link's token (base64url); the token itself is never stored. */
  tokenHash: string;
  invitedBy: string | null;
  expiresAt: ColumnType<Date, Date, Date>;
  acceptedAt: Date | null;
  acceptedBy: string | null;
  revokedAt: Date | null;
  sendStatus: Generated<SendStatus>;
  sendError: string | null;
  lastSentAt: Date | null;
  createdAt: Timestamp;
}

export interface PasswordResetsTable {
  id: Generated<string>;
  userId: string;
  tokenHash: string;
  expiresAt: ColumnType<Date, Date, Date>;
  usedAt: Date | null;
  createdAt: Timestamp;
}

export interface NotificationPrefsTable {
  userId: string;
  key: NotificationKey;
  enabled: boolean;
  updatedAt: Timestamp;
}

/** A line of the parts wanted list: one specification, its status and heritage rule. */
export interface PartLinesTable extends Versioned {
  /** Short per-site number a person can say (W-12). */
  number: Generated<number>;
  origin: "register" | "manual";
  kind: ComponentKind;
  ratingAmps: Num;
  poles: Num;
  voltageRating: Num;
  frame: Text;
  mounting: Text;
  maker: Text;
  model: Text;
  /** What exactly is wanted when it is not the whole component ("arc chute", "pilot lamp lens"). */
  need: Text;
  notes: Text;
  cancelReason: Text;
  createdBy: string | null;
  /** SPEC_FIELDS that must match for a need to join this line; null = all of them. */
  mustMatch: ColumnType<string[] | null, string[] | null | undefined, string[] | null>;
  specKey: string;
  heritageRule: Generated<HeritageRule>;
  status: Generated<PartStatus>;
  autoCancelled: Generated<boolean>;
  manualQty: Generated<number>;
  estimatedUnitCost: Num;
  fittedAt: Date | null;
}

/** Ties a line to the component or defect that wants it; kept (inactive or fitted) for the history. */
export interface PartDemandLinksTable {
  id: Generated<string>;
  siteId: string;
  lineId: string;
  componentId: string | null;
  defectId: string | null;
  positionId: string | null;
  boardId: string | null;
  qty: Generated<number>;
  active: Generated<boolean>;
  fitted: Generated<boolean>;
  createdAt: Timestamp;
  withdrawnAt: Date | null;
  fittedAt: Date | null;
}

export interface PartLeadsTable extends Versioned {
  lineId: string;
  sourceKind: Generated<LeadSourceKind>;
  source: string;
  contact: Text;
  notes: Text;
  createdBy: string | null;
  askingPrice: Num;
  qtyOffered: Num;
  status: Generated<LeadStatus>;
}

export interface PartAcquisitionsTable {
  id: Generated<string>;
  siteId: string;
  lineId: string;
  leadId: string | null;
  qty: number;
  cost: number;
  acquiredOn: string;
  notes: Text;
  recordedBy: string | null;
  createdAt: Timestamp;
}

export interface PartLineHistoryTable {
  id: Generated<number>;
  siteId: string;
  lineId: string;
  action: string;
  summary: Text;
  fromStatus: PartStatus | null;
  toStatus: PartStatus | null;
  actorId: string | null;
  at: Timestamp;
}

/** What one line adds to one board's budget ('' = not tied to a board): kept by server/parts/budget-repository.ts. */
export interface PartBudgetSharesTable {
  lineId: string;
  siteId: string;
  board: string;
  estimated: number;
  spent: number;
  unestimated: number;
}

/** The sums of the shares per site and board, and how many shares there are: kept by server/parts/budget-repository.ts. */
export interface PartBudgetBoardsTable {
  siteId: string;
  board: string;
  estimated: number;
  spent: number;
  unestimatedLines: number;
  shares: number;
}

/** A public read-only link to the wanted list; only the SHA-256 of its token is stored. */
export interface PartShareLinksTable {
  id: Generated<string>;
  siteId: string;
  tokenHash: string;
  label: Text;
  createdBy: string | null;
  createdAt: Timestamp;
  revokedAt: Date | null;
  revokedBy: string | null;
}

/** Per site: which photo kinds every position needs (the photographer's shoot list). */
export interface PhotoSettingsTable {
  siteId: string;
  requiredKinds: ColumnType<PhotoKind[], PhotoKind[] | undefined, PhotoKind[]>;
  version: Generated<number>;
  updatedAt: Timestamp;
}

// ---- Readings: stored raw, judged on every read against reading_criteria ----
export type Conductors = "A-B" | "B-C" | "C-A" | "A-G" | "B-G" | "C-G" | "line-load";
export type LampLook = "bright" | "dim" | "dark";

interface ReadingRow {
  id: Generated<string>;
  siteId: string;
  boardId: string;
  measuredAt: ColumnType<Date, Date | string, Date | string>;
  instrument: Text;
  notes: Text;
  recordedBy: string | null;
  createdAt: Timestamp;
}

export interface InsulationReadingsTable extends ReadingRow {
  componentId: string | null;
  circuit: Text;
  testVoltsDc: number;
  megohms: number;
  conductors: Conductors;
  equipmentTempC: number;
  ambientTempC: Num;
  humidityPercent: Num;
  durationS: Num;
  r30sMegohms: Num;
  r1minMegohms: Num;
  r10minMegohms: Num;
  /** How the meter showed each value (null = exactly). */
  megohmsQualifier: ReadingQualifierCol;
  r30sQualifier: ReadingQualifierCol;
  r1minQualifier: ReadingQualifierCol;
  r10minQualifier: ReadingQualifierCol;
}
export type ReadingQualifierCol = "at_or_above" | "below" | null;

export interface ContactReadingsTable extends ReadingRow {
  componentId: string;
  poleMicroOhms: number[];
  testCurrentA: number;
}

export interface ThermalScansTable extends ReadingRow {
  componentId: string;
  componentTempC: number;
  similarTempC: Num;
  ambientTempC: Num;
  loadPercent: Num;
  loadAmps: Num;
  photoId: string | null;
}

export interface GroundLampChecksTable extends ReadingRow {
  energisation: Text;
  lineVolts: number;
  lampA: LampLook | null;
  lampB: LampLook | null;
  lampC: LampLook | null;
  voltsA: Num;
  voltsB: Num;
  voltsC: Num;
  branchOhms: Num;
  capacitanceMicroF: Num;
}

export interface TripTestsTable extends ReadingRow {
  componentId: string;
  test: "inverse_time" | "instantaneous";
  tripUnit: "thermal_magnetic" | "electronic";
  adjustable: Generated<boolean>;
  pole: Text;
  ratingAmps: number;
  systemVolts: number;
  testAmps: Num;
  tripSeconds: Num;
  bandMinSeconds: Num;
  bandMaxSeconds: Num;
  settingAmps: Num;
  publishedLowAmps: Num;
  publishedHighAmps: Num;
  pickupAmps: Num;
}

export interface StepVoltageTestsTable extends ReadingRow {
  componentId: string | null;
  circuit: Text;
  conductors: Conductors;
  equipmentTempC: Num;
  stepVolts: number[];
  stepMegohms: number[];
}

export interface GroundHuntStepsTable extends ReadingRow {
  hunt: string;
  positionId: string | null;
  feeder: string;
  action: "opened" | "closed";
  lampA: LampLook;
  lampB: LampLook;
  lampC: LampLook;
}

export interface ReadingCriteriaTable {
  siteId: string;
  correctionMethod: Generated<"ieee43_40c" | "neta_20c">;
  insulationMedium: Generated<"solid" | "oil">;
  thermalClass: Generated<"A" | "B" | "F" | "H">;
  minimumMegohms: Num;
  minimumSource: Text;
  contactOutlierPercent: Generated<number>;
  dewPointMarginK: Generated<number>;
  version: Generated<number>;
  updatedBy: string | null;
  updatedAt: Timestamp;
}

export interface ComponentReadingOverridesTable {
  id: Generated<string>;
  siteId: string;
  componentId: string;
  minimumMegohms: Num;
  maximumMicroOhms: Num;
  source: string;
  version: Generated<number>;
  updatedBy: string | null;
  updatedAt: Timestamp;
}

/** A reading that raised a defect or proves its repair; owned by server/defects. */
export interface DefectReadingsTable {
  id: Generated<string>;
  siteId: string;
  defectId: string;
  readingKind: "insulation" | "contact" | "thermal" | "ground";
  readingId: string;
  role: "raised_from" | "retest";
  linkedBy: string | null;
  linkedAt: Timestamp;
}

// ---- Return to service (migration 2026_12_02_0300): owned by server/return-to-service ----
type RtsSupply = Supply;
type RtsVoltageStep = VoltageStep;
type RtsStageStatus = StageStatus;
type RtsStepKind = StepKind;
export type RtsSignoffKind = "signed" | "released" | "struck";
export type RtsLamps = "equal" | "one_dim" | "one_dark" | "not_seen";
export type RtsIncidentKind = "protection_operated" | "dark_lamp" | "hot_spot" | "low_insulation" | "other";

export interface RtsQualifiedPersonsTable extends Versioned {
  userId: string;
  qualification: string;
  expiresOn: string | null;
  updatedBy: string | null;
}

export interface RtsSettingsTable {
  siteId: string;
  insulationMaxAgeDays: Generated<number>;
  template: ColumnType<unknown, string, string>;
  version: Generated<number>;
  updatedBy: string | null;
  updatedAt: Timestamp;
}

export interface RtsStagesTable extends Versioned {
  boardId: string;
  sortOrder: number;
  name: string;
  supply: RtsSupply;
  protectionDevice: Text;
  protectionRatingA: Num;
  protectionLimitA: Num;
  voltageStep: RtsVoltageStep;
  stepVolts: Num;
  dependsOnId: string | null;
  qualifiedPersonId: string | null;
  watchHours: Generated<number>;
  checkEveryHours: Generated<number>;
  status: Generated<RtsStageStatus>;
  attempt: Generated<number>;
  energisedAt: Date | null;
  releasedAt: Date | null;
  notes: Text;
}

export interface RtsStageItemsTable {
  id: Generated<string>;
  siteId: string;
  stageId: string;
  sectionId: string | null;
  positionId: string | null;
}

export interface RtsStepsTable extends Versioned {
  stageId: string;
  sortOrder: number;
  kind: RtsStepKind;
  title: string;
  detail: Text;
  qualifiedOnly: Generated<boolean>;
}

export interface RtsSignoffsTable {
  id: Generated<string>;
  siteId: string;
  stageId: string;
  stepId: string;
  attempt: number;
  kind: RtsSignoffKind;
  signedBy: string | null;
  signerName: string;
  signedAt: Timestamp;
  reason: Text;
  note: Text;
  evidence: ColumnType<unknown, string | undefined, never>;
  supersedesId: string | null;
  /** A release's blockers as it saw them (src/domain/rts-gate.ts blockerKey); null otherwise or from before. */
  covers: string[] | null;
}

export interface RtsEnergisationsTable {
  id: Generated<string>;
  siteId: string;
  boardId: string;
  stageId: string;
  attempt: number;
  kind: "energise" | "de_energise";
  at: ColumnType<Date, Date | string, Date | string>;
  supply: RtsSupply;
  volts: Num;
  protectionDevice: Text;
  protectionRatingA: Num;
  note: Text;
  recordedBy: string | null;
  createdAt: Timestamp;
}

export interface RtsWatchChecksTable {
  id: Generated<string>;
  siteId: string;
  stageId: string;
  attempt: number;
  at: ColumnType<Date, Date | string, Date | string>;
  lamps: RtsLamps;
  lampPhase: "A" | "B" | "C" | null;
  smell: Generated<boolean>;
  sound: Generated<boolean>;
  warmToHand: Generated<boolean>;
  thermalPositionId: string | null;
  thermalC: Num;
  ambientC: Num;
  note: Text;
  recordedBy: string | null;
  /** The observed time as the phone gave it (its own clock); `at` is that time on the server's clock. */
  deviceAt: ColumnType<Date | null, Date | string | null | undefined, Date | string | null>;
  /** The phone's clock minus the server's when it was sent (s); null when the phone did not say. */
  clockSkewS: number | null;
  /** When the server received it. */
  createdAt: Timestamp;
}

export interface RtsIncidentsTable {
  id: Generated<string>;
  siteId: string;
  boardId: string;
  stageId: string;
  attempt: number;
  at: ColumnType<Date, Date | string, Date | string>;
  kind: RtsIncidentKind;
  positionId: string | null;
  defectId: string | null;
  watchCheckId: string | null;
  readingKind: "thermal_scan" | "insulation_reading" | null;
  readingId: string | null;
  summary: string;
  note: Text;
  recordedBy: string | null;
  createdAt: Timestamp;
}

export interface RtsBreakerOperationsTable {
  id: Generated<string>;
  siteId: string;
  boardId: string;
  componentId: string;
  stageId: string | null;
  operation: "open" | "close";
  at: ColumnType<Date, Date | string, Date | string>;
  why: Text;
  operatedBy: string | null;
  createdAt: Timestamp;
}

export interface RtsOperationBudgetsTable extends Versioned {
  componentId: string;
  budget: number;
  reason: Text;
  updatedBy: string | null;
}

export interface RtsOverdueNoticesTable {
  id: Generated<string>;
  siteId: string;
  stageId: string;
  attempt: number;
  dueAt: ColumnType<Date, Date | string, Date | string>;
  sentTo: string | null;
  outcome: "sent" | "failed" | "switched_off" | "suspended" | "no_qualified_person";
  error: string | null;
  createdAt: Timestamp;
}

/** One create's first result, answered again to every repeat of its Idempotency-Key. */
export interface IdempotencyKeysTable {
  userId: string;
  key: string;
  method: string;
  path: string;
  fingerprint: string;
  state: Generated<"running" | "done">;
  responseStatus: number | null;
  responseBody: ColumnType<unknown, string | null | undefined, string | null>;
  createdAt: Timestamp;
  completedAt: ColumnType<Date | null, Date | string | null | undefined, Date | string | null>;
}

/** One running download per row: the per-person cap across instances; server/export-stream.ts writes it. */
export interface ExportSlotsTable {
  id: Generated<string>;
  /** The person's user id ("anonymous" for a download without a session). */
  holder: string;
  startedAt: Generated<Date>;
  /** Renewed while the download runs; an expired row no longer counts (its instance died). */
  leaseUntil: Date;
}

export type PreparedFileKind = "survey_report" | "inventory_csv" | "defects_csv" | "parts_csv";
export type PreparedFileState = "queued" | "rendering" | "ready" | "failed" | "expired";

/** A report or large export made by a background job into object storage; server/prepared-files writes it. */
export interface PreparedFilesTable {
  id: Generated<string>;
  siteId: string;
  requestedBy: string;
  kind: PreparedFileKind;
  /** The same query the direct download takes, as validated (re-parsed by the job). */
  params: ColumnType<Record<string, unknown>, string | undefined, string>;
  state: Generated<PreparedFileState>;
  progressDone: Generated<number>;
  progressTotal: number | null;
  attempts: Generated<number>;
  error: string | null;
  fileName: string;
  contentType: string;
  storageKey: string | null;
  sizeBytes: number | null;
  createdAt: Generated<Date>;
  startedAt: Date | null;
  finishedAt: Date | null;
  expiresAt: Date | null;
  seenAt: Date | null;
  version: Generated<number>;
}

/**
 * Per-board counts the site overview and the board list read, kept current by every
 * inventory write that changes them; server/inventory/board-summaries-repository.ts is the only writer.
 */
export interface BoardSummariesTable {
  boardId: string;
  siteId: string;
  facet: "positions" | "disposition" | "custody" | "grade" | "retained";
  key: string;
  surveyed: boolean;
  n: number;
}

/**
 * How many defects each (site, board, status, severity) holds, kept by triggers on `defects` in the same
 * statement as each write (migration 2026_12_09_0100); the register's total reads it. Owned by the
 * defects domain; nothing but those triggers writes it.
 */
export interface DefectTalliesTable {
  siteId: string;
  boardId: string;
  status: string;
  severity: string;
  n: number;
}

export interface Database {
  boardSummaries: BoardSummariesTable;
  defectTallies: DefectTalliesTable;
  preparedFiles: PreparedFilesTable;
  exportSlots: ExportSlotsTable;
  idempotencyKeys: IdempotencyKeysTable;
  defectReadings: DefectReadingsTable;
  users: UsersTable;
  sessions: SessionsTable;
  sites: SitesTable;
  memberships: MembershipsTable;
  floodEvents: FloodEventsTable;
  boards: BoardsTable;
  sections: SectionsTable;
  positions: PositionsTable;
  components: ComponentsTable;
  inspections: InspectionsTable;
  custodyMoves: CustodyMovesTable;
  dispositionDecisions: DispositionDecisionsTable;
  auditLog: AuditLogTable;
  rateLimits: RateLimitsTable;
  defects: DefectsTable;
  photos: PhotosTable;
  invitations: InvitationsTable;
  passwordResets: PasswordResetsTable;
  notificationPrefs: NotificationPrefsTable;
  partLines: PartLinesTable;
  partDemandLinks: PartDemandLinksTable;
  partLeads: PartLeadsTable;
  partAcquisitions: PartAcquisitionsTable;
  partLineHistory: PartLineHistoryTable;
  partShareLinks: PartShareLinksTable;
  partBudgetShares: PartBudgetSharesTable;
  partBudgetBoards: PartBudgetBoardsTable;
  photoSettings: PhotoSettingsTable;
  defectPins: DefectPinsTable;
  defectStatusChanges: DefectStatusChangesTable;
  defectViews: DefectViewsTable;
  insulationReadings: InsulationReadingsTable;
  contactReadings: ContactReadingsTable;
  thermalScans: ThermalScansTable;
  groundLampChecks: GroundLampChecksTable;
  readingCriteria: ReadingCriteriaTable;
  componentReadingOverrides: ComponentReadingOverridesTable;
  tripTests: TripTestsTable;
  stepVoltageTests: StepVoltageTestsTable;
  groundHuntSteps: GroundHuntStepsTable;
  mailOutbox: MailOutboxTable;
  rtsQualifiedPersons: RtsQualifiedPersonsTable;
  rtsSettings: RtsSettingsTable;
  rtsStages: RtsStagesTable;
  rtsStageItems: RtsStageItemsTable;
  rtsSteps: RtsStepsTable;
  rtsSignoffs: RtsSignoffsTable;
  rtsEnergisations: RtsEnergisationsTable;
  rtsWatchChecks: RtsWatchChecksTable;
  rtsIncidents: RtsIncidentsTable;
  rtsBreakerOperations: RtsBreakerOperationsTable;
  rtsOperationBudgets: RtsOperationBudgetsTable;
  rtsOverdueNotices: RtsOverdueNoticesTable;
}
