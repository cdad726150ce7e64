/**
 * Serial Shipping Container Codes (AI 00) for Evalon's outbound and return shipments.
 * @packageDocumentation
 */
import { gs1CheckDigit } from './check-digit';

/** The parts of an SSCC before its check digit. */
export interface SsccParts {
  /** 0–9, chosen by the company that builds the SSCC to widen its serial range. */
  readonly extensionDigit: number | string;
  /** The lender's GS1 Company Prefix, as digits (leading zeros matter). */
  readonly companyPrefix: string;
  /** The lender's serial reference for this shipment, as digits (leading zeros matter). */
  readonly serialReference: string;
}

/**
 * The 18-digit SSCC: extension digit + GS1 Company Prefix + serial reference + check digit
 * (GS1 General Specifications, AI 00; check digit §7.9.1). Company prefix and serial reference
 * together are 16 digits; a GS1 Company Prefix is 4 to 12 digits long (from memory, GS1 General
 * Specifications §1.4.4: checked here only as a plausibility bound).
 * @throws RangeError when a part is not digits or the lengths do not add up.
 */
export function buildSscc({ extensionDigit, companyPrefix, serialReference }: SsccParts): string {
  const extension = String(extensionDigit);
  if (!/^\d$/.test(extension)) {
    throw new RangeError(`The extension digit must be one digit 0–9, got "${extension}".`);
  }
  if (!/^\d{4,12}$/.test(companyPrefix)) {
    throw new RangeError(`A GS1 Company Prefix is 4 to 12 digits, got "${companyPrefix}".`);
  }
  if (!/^\d+$/.test(serialReference)) {
    throw new RangeError(`The serial reference must be digits, got "${serialReference}".`);
  }
  const total = companyPrefix.length + serialReference.length;
  if (total !== 16) {
    throw new RangeError(
      `Company prefix and serial reference must be 16 digits together, got ${total} ` +
        `(${companyPrefix.length} + ${serialReference.length}): a ${companyPrefix.length}-digit ` +
        `prefix leaves ${16 - companyPrefix.length} digits for the serial reference.`,
    );
  }
  const body = `${extension}${companyPrefix}${serialReference}`;
  return `${body}${gs1CheckDigit(body)}`;
}
