export { containmentCode, containmentPrefix, normaliseContainmentCode } from "./code";
export { affectedByItem, affectedByPairs, groupOf, LISTED_KINDS, type AffectedRow } from "./affected";
export { raiseContainment, resolveTarget, affectedOf, TARGET_KINDS, QUALITY_STATION, type RaiseInput, type Raised, type ResolvedTarget } from "./raise";
export { holdsOn, firstHolds, holdRefusal, refuseIfHeld, holdMessage, type Hold } from "./holds";
export { moveAffected, closeContainment, containmentOrRefuse, type MoveInput, type MoveResult } from "./work";
export { sendNotices, ownersToTell, type NoticesSent } from "./notices";
export { listContainments, affectedSerials, progressOf, noticesOf, containmentDetail, containmentsTouching, dealersOf, type ContainmentTouch, type AffectedSerial, type ContainmentSummary, type ContainmentProgress, type NoticeRow, type ContainmentDetail } from "./queries";
export { affectedCsv, affectedEpcis, dealerOrRefuse, AFFECTED_CSV_FIELDS, type ExportDealer } from "./exports";
export { containmentPageData, CONTAINMENT_PAGE_ROWS, type ContainmentPageData } from "./page-data";
