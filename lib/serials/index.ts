// The pure serial and check-character functions. The allocator queries the database, so it is
// imported from "@/lib/serials/allocator" by server code only.
export { isValidMod37_2, mod37_2Check, MOD37_ALPHABET } from "./iso7064";
export { cartonElementString, gs1CheckDigit, GS, isValidGtin, type CartonElementInput, type CartonElementString } from "./gs1";
export {
  formatSerial,
  LEAF_MAX,
  leafIdentity,
  normaliseScan,
  PART_TYPE_CODES,
  parseLeafIdentity,
  parseSerial,
  SEQ_MAX,
  SERIAL_KIND_LETTERS,
  serialReadings,
  type ParsedLeafIdentity,
  type ParsedSerial,
  type PartType,
  type SerialKind,
  type SerialParts,
} from "./format";
export { nearMisses } from "./suggest";
export { batchCode, makerLotIdentity } from "./lots";
