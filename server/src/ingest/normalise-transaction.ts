import type { NormalisedTransaction, ValidBackfillTransaction, ValidTransaction } from '@shared/api/transactions';
import { maskPansInText } from '@shared/card/pan';
import { tokenisePan } from './pan-token';

const isBackfill = (v: ValidTransaction | ValidBackfillTransaction): v is ValidBackfillTransaction =>
  'label' in v && v.label !== undefined;

/**
 * The stored shape of a validated transaction. The card number is replaced by
 * BIN, last four and its keyed hash here, so nothing after this point (the
 * database, the job payload, the logs) can hold it; another card's number in
 * the merchant name is masked. `panHmacKey` is the server's PAN_HMAC_KEY.
 */
export function normaliseTransaction(valid: ValidTransaction | ValidBackfillTransaction, panHmacKey: string | Uint8Array): NormalisedTransaction {
  const token = tokenisePan(valid.card.pan, panHmacKey);
  const out: NormalisedTransaction = {
    externalId: valid.id,
    occurredAt: new Date(valid.occurredAt.getTime()),
    amountMinor: valid.amountMinor,
    currency: valid.currency,
    currencyExponent: valid.currencyExponent,
    amount: valid.amountMinor / 10 ** valid.currencyExponent,
    card: {
      bin: token.bin,
      last4: token.last4,
      panHash: token.panHash,
      cardholderId: valid.card.cardholderId,
      expiry: valid.card.expiry,
    },
    // The merchant name is display text an acquirer writes (a refund note may hold another card's number): masked to BIN and last four.
    merchant: { ...valid.merchant, name: maskPansInText(valid.merchant.name) },
    cardPresent: valid.cardPresent,
    channel: valid.channel,
    deviceId: valid.deviceId,
    ip: valid.ip,
    lat: valid.location?.lat ?? null,
    lon: valid.location?.lon ?? null,
  };
  if (isBackfill(valid) && valid.label !== null) {
    out.label = valid.label;
    out.labelReportedAt = valid.labelReportedAt;
  }
  return out;
}
