/** The pair certificate: its data from the register, its PDF, and the records of issuing and printing it. */
export {
  certificateData,
  certificateOf,
  formatDb,
  formatHz,
  issueCertificate,
  pairByIdentity,
  type CertificateData,
  type FinalTestFigure,
  type MatchFigure,
  type PositionRow,
  type Replacement,
  type RevisionFigure,
  issueCertificateIn,
  type Signature,
  type SignatureStep,
  type VeneerFace,
  type VeneerLeafOnFace,
  type VeneerOrigin,
} from "./data";
export { copyNote, renderCertificate } from "./render";
export { openablePrint, originalPrinted, PRINT_OPEN_FOR_MS, recordCertificatePrint, type RecordedPrint } from "./prints";
export { CERTIFICATE_CODE_LENGTH, CERTIFICATE_CODE_PATTERN, certificateCode, verifyUrl } from "./code";
export { currentRevision, issueRevision, recordRevisionPrint, replacementsSince, revisionsOf } from "./revisions";
export { repairLine, type RepairPart } from "./repair-line";
