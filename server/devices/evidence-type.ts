import type { DeviceEvidence } from '../../shared/api/devices.js';

/**
 * The type of an evidence file from its first bytes (its "magic number"), never from the name or the
 * type the browser declared. Signatures: PDF "%PDF-" (ISO 32000-1:2008 7.5.2), PNG 89 50 4E 47 0D 0A 1A 0A
 * (PNG specification, 5.2), JPEG FF D8 FF (SOI marker then the next marker, ITU-T T.81 B.1.1.3).
 */
export function detectEvidenceType(bytes: Uint8Array): DeviceEvidence['contentType'] | null {
  const starts = (signature: readonly number[]) => bytes.length >= signature.length && signature.every((byte, index) => bytes[index] === byte);
  if (starts([0x25, 0x50, 0x44, 0x46, 0x2d])) return 'application/pdf';
  if (starts([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])) return 'image/png';
  if (starts([0xff, 0xd8, 0xff])) return 'image/jpeg';
  return null;
}
