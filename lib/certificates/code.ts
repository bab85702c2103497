import { randomBytes } from "node:crypto";

/** RFC 4648 base32 alphabet, lower case: no 0/1/8/9, so a code read aloud or retyped stays unambiguous. */
const ALPHABET = "abcdefghijklmnopqrstuvwxyz234567";

/** Bytes of randomness in a certificate code: 128 bits, far beyond guessing the link of another pair. */
export const CERTIFICATE_CODE_BYTES = 16;
/** ⌈128 / 5⌉ characters, no padding. */
export const CERTIFICATE_CODE_LENGTH = 26;
export const CERTIFICATE_CODE_PATTERN = /^[a-z2-7]{26}$/;

/** Base32 (RFC 4648, lower case, unpadded) of the bytes. */
export function base32(bytes: Uint8Array): string {
  let out = "";
  let buffer = 0;
  let bits = 0;
  for (const byte of bytes) {
    buffer = (buffer << 8) | byte;
    bits += 8;
    while (bits >= 5) {
      out += ALPHABET[(buffer >>> (bits - 5)) & 31];
      bits -= 5;
    }
    buffer &= (1 << bits) - 1;
  }
  if (bits > 0) out += ALPHABET[(buffer << (5 - bits)) & 31];
  return out;
}

/** The unguessable part of a certificate's public link: 16 bytes as 26 base32 characters. */
export function certificateCode(bytes: Uint8Array = randomBytes(CERTIFICATE_CODE_BYTES)): string {
  if (bytes.length !== CERTIFICATE_CODE_BYTES) throw new Error(`A certificate code takes ${CERTIFICATE_CODE_BYTES} bytes, got ${bytes.length}`);
  return base32(bytes);
}

/** The public link printed on the certificate and in its QR code. */
export function verifyUrl(baseUrl: string, code: string): string {
  return `${baseUrl.replace(/\/+$/, "")}/verify/${code}`;
}
