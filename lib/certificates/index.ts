/** The pair certificate: its data from the register, its PDF, and the records of issuing and printing it. */
export {
  certificateData,
  certificateOf,
  certificatePrinted,
  formatDb,
  formatHz,
  issueCertificate,
  pairByIdentity,
  recordCertificatePrint,
  type CertificateData,
  type FinalTestFigure,
  type MatchFigure,
  type PositionRow,
  type Replacement,
  type Signature,
  type SignatureStep,
  type VeneerFace,
  type VeneerLeafOnFace,
  type VeneerOrigin,
} from "./data";
export { copyNote, renderCertificate } from "./render";
export { CERTIFICATE_CODE_LENGTH, CERTIFICATE_CODE_PATTERN, certificateCode, verifyUrl } from "./code";
